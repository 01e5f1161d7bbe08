// Worker-thread entry: characterises one measured-traffic file off the worker process's event loop (a large
// file takes seconds, which would otherwise stall pg-boss's polling and every running chunk's progress writes).
// Bundled to plain JavaScript by lib/ops/bundle.ts; answers with a tagged result because errors lose their
// class across threads.
import { characterise, MeasurementInputError, type Characterisation, type MeasuredData } from "../lib/measurement";

export type CharacteriseOutcome =
  | { ok: true; value: Characterisation }
  | { ok: false; refusal?: { code: MeasurementInputError["code"]; line?: number; column?: string }; message: string };

export default function characteriseInThread(data: MeasuredData): CharacteriseOutcome {
  try {
    return { ok: true, value: characterise(data) };
  } catch (error) {
    const refusal = error instanceof MeasurementInputError ? { code: error.code, line: error.line, column: error.column } : undefined;
    return { ok: false, refusal, message: (error as Error).message };
  }
}
