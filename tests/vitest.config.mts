import { defineConfig } from "vitest/config";
import path from "node:path";
import { fileURLToPath } from "node:url";

const here = path.dirname(fileURLToPath(import.meta.url));

const root = path.resolve(here, "..");
const alias = { "@": root, "server-only": path.resolve(here, "support/server-only-shim.ts") };

export default defineConfig({
  root,
  resolve: { alias },
  test: {
    projects: [
      {
        root,
        resolve: { alias },
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node", testTimeout: 120_000 },
      },
      {
        root,
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          testTimeout: 60_000,
          hookTimeout: 60_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
