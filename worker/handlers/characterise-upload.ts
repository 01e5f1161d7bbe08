// characterise-upload: read a stored measured-traffic file, characterise it (lib/measurement), write progress
// to the upload row while it reads, and store the characterisation, or a clear error on the row.
import type PgBoss from "pg-boss";
import type { Payload } from "../../lib/jobs/contracts";
import { MeasurementInputError, readMeasurementCsv, type Characterisation } from "../../lib/measurement";
import { postgresObjectStore } from "../../db/queries/objects";
import { failUpload, findUploadForWork, finishUpload, markUploadCharacterising, setUploadProgress } from "../../db/queries/uploads";
import type { WorkerContext } from "../context";
import { characteriseOffThread } from "../measurement-pool";

/** Share of the progress bar given to reading the file; the rest is the characterisation. */
const READ_SHARE = 0.3;
/** At most one progress write per this many milliseconds. */
const PROGRESS_EVERY_MS = 500;

export async function characteriseUpload(ctx: WorkerContext, { uploadId }: Payload<"characterise-upload">, job?: PgBoss.JobWithMetadata<unknown>): Promise<void> {
  const upload = await findUploadForWork(ctx.db, uploadId);
  if (!upload || !(await markUploadCharacterising(ctx.db, uploadId))) return; // gone, or done by an earlier delivery
  let lastWrite = 0;
  const report = async (fraction: number) => {
    if (Date.now() - lastWrite < PROGRESS_EVERY_MS) return;
    lastWrite = Date.now();
    await setUploadProgress(ctx.db, uploadId, fraction);
  };
  let outcome: { ok: true; value: Characterisation } | { ok: false; message: string };
  try {
    const object = await postgresObjectStore(ctx.db).getObject(upload.workspaceId, upload.objectKey);
    if (!object) throw new MeasurementInputError("empty-file", "the stored file is missing; upload it again");
    const pending: Promise<void>[] = [];
    const data = await readMeasurementCsv(object.bytes, upload.mapping, {
      onProgress: (bytes) => void pending.push(report((READ_SHARE * bytes) / Math.max(1, object.sizeBytes))),
    });
    await Promise.all(pending);
    await setUploadProgress(ctx.db, uploadId, READ_SHARE);
    // In a thread: a large file takes seconds, which must not stall this process's queue polling and chunks.
    outcome = { ok: true, value: await characteriseOffThread(data) };
  } catch (error) {
    // A MeasurementInputError is about the file itself (a changed rule, a lost object, or a data limitation such as
    // no complete clock hour or no answered calls): permanent, stored with its message, no retries. Anything else
    // may be passing (the thread, the database), so pg-boss retries it while it may.
    if (error instanceof MeasurementInputError) outcome = { ok: false, message: error.message };
    else if (job && job.retryCount < job.retryLimit) throw error; // pg-boss tries again
    else outcome = { ok: false, message: `the worker failed (${(error as Error).message})` };
  }
  if (outcome.ok) await finishUpload(ctx.db, uploadId, outcome.value);
  else await failUpload(ctx.db, uploadId, `The file could not be characterised: ${outcome.message}`);
  ctx.log(`characterise-upload ${uploadId}: ${outcome.ok ? "ready" : "failed"}`);
}
