// Failure injection for the integration tests. Read only when NODE_ENV is "test", so no setting
// of a production process (npm start sets NODE_ENV=production) can trigger it.

/**
 * SPILLWAY_TEST_FAIL_CHUNK="<chunk>:<attempts>": attempts 1..<attempts> of chunk <chunk> (of any
 * run) throw before simulating, so the retry path and its audit run for real.
 */
export function injectedChunkFailure(chunk: number, attempt: number): Error | undefined {
  if (process.env.NODE_ENV !== "test") return undefined;
  const spec = /^(\d+):(\d+)$/.exec(process.env.SPILLWAY_TEST_FAIL_CHUNK ?? "");
  if (!spec || Number(spec[1]) !== chunk || attempt > Number(spec[2])) return undefined;
  return new Error(`injected test failure of chunk ${chunk}, attempt ${attempt}`);
}
