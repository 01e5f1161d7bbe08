// Durable object storage: the small interface uploads are kept behind. The PostgreSQL implementation is
// db/queries/objects.ts (`postgresObjectStore(executor)`, bytes in a bytea column, so an object commits or
// rolls back with the rows that point at it); anything with these three calls can replace it.
import { createHash } from "node:crypto";

export interface StoredObjectMeta {
  key: string;
  /** the workspace that owns the object (deleted with it) */
  workspaceId: string;
  contentType: string;
  sizeBytes: number;
  /** hex SHA-256 of the bytes */
  sha256: string;
}

export interface StoredObject extends StoredObjectMeta {
  bytes: Uint8Array;
}

export interface ObjectStore {
  /** Stores the bytes under a new key; a key already in use is an error, never an overwrite. */
  putObject(input: { key?: string; workspaceId: string; contentType: string; bytes: Uint8Array }): Promise<StoredObjectMeta>;
  /** The object, or null when there is none under that key in that workspace. */
  getObject(workspaceId: string, key: string): Promise<StoredObject | null>;
  /** True when something was deleted. */
  deleteObject(workspaceId: string, key: string): Promise<boolean>;
}

export const sha256Hex = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/** A fresh key: the kind of object and a random id, e.g. "upload/2b0f…". */
export const newObjectKey = (prefix: string) => `${prefix}/${crypto.randomUUID()}`;
