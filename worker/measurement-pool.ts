// One thread per worker process for characterising measured traffic (piscina), started on first use.
import path from "node:path";
import { Piscina } from "piscina";
import { bundleDir } from "../lib/config";
import { fileURLToPath } from "node:url";
import { MeasurementInputError, type Characterisation, type MeasuredData } from "../lib/measurement";
import type { CharacteriseOutcome } from "./measurement-thread";

let pool: Piscina | undefined;

function threadFile(): { filename: string; execArgv: string[] } {
  const dir = bundleDir();
  if (dir) return { filename: path.join(dir, "measurement-worker.js"), execArgv: [] };
  // Development and tests without a bundle: load the TypeScript entry through tsx.
  return { filename: path.join(path.dirname(fileURLToPath(import.meta.url)), "measurement-thread.ts"), execArgv: ["--import", "tsx"] };
}

/** characterise(data) in the thread; a refusal of the data comes back as MeasurementInputError as in-process. */
export async function characteriseOffThread(data: MeasuredData): Promise<Characterisation> {
  pool ??= new Piscina({ ...threadFile(), minThreads: 0, maxThreads: 1, idleTimeout: 30_000 });
  const outcome: CharacteriseOutcome = await pool.run(data);
  if (outcome.ok) return outcome.value;
  if (outcome.refusal) throw new MeasurementInputError(outcome.refusal.code, outcome.message, outcome.refusal.line, outcome.refusal.column);
  throw new Error(outcome.message);
}

export async function closeMeasurementPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}
