import { defineConfig } from "vitest/config";
import path from "node:path";

const root = path.resolve(__dirname, "..");
const alias = { "@": root, "server-only": path.resolve(__dirname, "support/server-only-stub.ts") };

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
