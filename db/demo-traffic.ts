// The demo workspace's measured traffic: the seeded demo call-record file (public/demo/, lib/measurement/demo.ts),
// stored and characterised at seed time (pure functions, no worker needed), as a ready upload. Idempotent: the
// same bytes are stored once per workspace.
import { readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { and, eq, sql } from "drizzle-orm";
import type { Database } from "./client";
import { memberships, users, workspaces } from "./schema";
import { findUploadBySha256, insertUpload } from "./queries/uploads";
import { characterise, DEMO_CSV_PATH, parseMapping, previewCsv, readMeasurementCsv } from "../lib/measurement";
import { sha256Hex } from "../lib/storage";

/** The demo workspace and engineer the upload belongs to (db/demo-data.ts). */
const DEMO_WORKSPACE = "kestrel-fen";
const DEMO_UPLOADER = "engineer@kestrel-fen.test";

export async function seedDemoTraffic(db: Database, log: (line: string) => void = () => {}): Promise<void> {
  const [owner] = await db
    .select({ workspaceId: workspaces.id, userId: users.id })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(workspaces.slug, DEMO_WORKSPACE), sql`lower(${users.email}) = ${DEMO_UPLOADER}`));
  if (!owner) return;
  const bytes = new Uint8Array(readFileSync(path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", DEMO_CSV_PATH)));
  if (await findUploadBySha256(db, owner.workspaceId, sha256Hex(bytes))) return;
  const guess = (await previewCsv(bytes)).guess;
  if (!guess) throw new Error(`${DEMO_CSV_PATH}: its header no longer suggests a mapping`);
  const mapping = parseMapping(guess);
  const characterisation = characterise(await readMeasurementCsv(bytes, mapping));
  await db.transaction((tx) => insertUpload(tx, { ...owner, fileName: path.basename(DEMO_CSV_PATH), mapping, bytes, contentType: "text/csv", characterisation }));
  log(`demo traffic: ${path.basename(DEMO_CSV_PATH)} stored and characterised in ${DEMO_WORKSPACE}`);
}
