// The demo workspace: invented names only (no real organisations, people or places).
import type { WorkspaceRole } from "../lib/schemas/roles";

export const demoWorkspaces = [
  {
    slug: "kestrel-fen",
    name: "Kestrel Fen Exchange Study",
    description: "Trunk-route and overflow sizing for an imaginary regional exchange.",
    safetyCritical: false,
  },
  {
    slug: "thornmere-ward",
    name: "Thornmere Ward Capacity",
    description: "Bed-pool sizing for an imaginary hospital ward: safety-critical, needs qualified review.",
    safetyCritical: true,
  },
] as const;

export interface DemoAccount {
  email: string;
  name: string;
  password: string;
  roles: Record<(typeof demoWorkspaces)[number]["slug"], WorkspaceRole | null>;
}

export const demoAccounts: DemoAccount[] = [
  { email: "admin@kestrel-fen.test", name: "Ada Marsh (demo admin)", password: "spillway-admin-demo", roles: { "kestrel-fen": "admin", "thornmere-ward": "viewer" } },
  { email: "engineer@kestrel-fen.test", name: "Eli Reed (demo engineer)", password: "spillway-engineer-demo", roles: { "kestrel-fen": "engineer", "thornmere-ward": null } },
  { email: "reviewer@kestrel-fen.test", name: "Rhea Sedge (demo reviewer)", password: "spillway-reviewer-demo", roles: { "kestrel-fen": "reviewer", "thornmere-ward": null } },
  { email: "viewer@kestrel-fen.test", name: "Vic Alder (demo viewer)", password: "spillway-viewer-demo", roles: { "kestrel-fen": "viewer", "thornmere-ward": null } },
  { email: "ward-admin@thornmere-ward.test", name: "Wren Tally (demo ward admin)", password: "spillway-ward-demo", roles: { "kestrel-fen": null, "thornmere-ward": "admin" } },
];
