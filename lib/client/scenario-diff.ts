// What changed between two revisions of a scenario: every leaf path whose value differs. Pure.

export interface Change {
  path: string;
  kind: "added" | "removed" | "changed";
  before?: unknown;
  after?: unknown;
}

function flatten(value: unknown, path: string, out: Map<string, unknown>) {
  if (value && typeof value === "object") {
    const entries = Array.isArray(value) ? value.map((v, i) => [String(i), v] as const) : Object.entries(value);
    if (entries.length === 0) out.set(path, value);
    for (const [key, inner] of entries) flatten(inner, Array.isArray(value) ? `${path}[${key}]` : path ? `${path}.${key}` : key, out);
    return;
  }
  if (value !== undefined) out.set(path, value);
}

export function diffScenarios(before: unknown, after: unknown): Change[] {
  const a = new Map<string, unknown>();
  const b = new Map<string, unknown>();
  flatten(before, "", a);
  flatten(after, "", b);
  const changes: Change[] = [];
  for (const [path, value] of a) {
    if (!b.has(path)) changes.push({ path, kind: "removed", before: value });
    else if (JSON.stringify(b.get(path)) !== JSON.stringify(value)) changes.push({ path, kind: "changed", before: value, after: b.get(path) });
  }
  for (const [path, value] of b) if (!a.has(path)) changes.push({ path, kind: "added", after: value });
  return changes.sort((x, y) => x.path.localeCompare(y.path));
}
