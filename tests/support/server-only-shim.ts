// server-only guards bundles; under vitest the modules run in plain Node.
export {};
