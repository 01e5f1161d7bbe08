// The PostgreSQL object store behind lib/storage's interface: one row per object, the bytes in a bytea
// column. Give it a transaction to make an object commit or roll back with the rows that point at it.
import { and, eq } from "drizzle-orm";
import type { Database } from "../client";
import { storedObjects } from "../schema";
import { newObjectKey, sha256Hex, type ObjectStore } from "../../lib/storage";

type Executor = Pick<Database, "insert" | "select" | "delete">;

export function postgresObjectStore(executor: Executor): ObjectStore {
  return {
    async putObject({ key, workspaceId, contentType, bytes }) {
      const meta = { key: key ?? newObjectKey("object"), workspaceId, contentType, sizeBytes: bytes.byteLength, sha256: sha256Hex(bytes) };
      await executor.insert(storedObjects).values({ ...meta, bytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) });
      return meta;
    },
    async getObject(workspaceId, key) {
      const [row] = await executor
        .select()
        .from(storedObjects)
        .where(and(eq(storedObjects.workspaceId, workspaceId), eq(storedObjects.key, key)));
      if (!row) return null;
      const { bytes, createdAt: _created, ...meta } = row;
      return { ...meta, bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength) };
    },
    async deleteObject(workspaceId, key) {
      const deleted = await executor
        .delete(storedObjects)
        .where(and(eq(storedObjects.workspaceId, workspaceId), eq(storedObjects.key, key)))
        .returning({ key: storedObjects.key });
      return deleted.length > 0;
    },
  };
}
