"use client";

import { useRouter } from "next/navigation";

export function WorkspaceSwitcher({ current, workspaces }: { current: string; workspaces: { slug: string; name: string; role: string }[] }) {
  const router = useRouter();
  return (
    <label className="flex items-center gap-2 text-sm">
      <span className="sr-only">Workspace</span>
      <select
        aria-label="Workspace"
        value={current}
        onChange={(event) => router.push(`/w/${event.target.value}`)}
        className="max-w-80 rounded-lg border border-basin-700 bg-basin-900 px-2 py-1.5 text-sm text-white"
      >
        {workspaces.map((w) => (
          <option key={w.slug} value={w.slug}>
            {w.name} ({w.role})
          </option>
        ))}
      </select>
    </label>
  );
}
