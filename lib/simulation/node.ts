// Spillway simulation engine, Node-only entry: worker-thread pool and whole-run drivers.
export * from "./index";
export { runScenario, runChunk, finishRun, type RunOptions, type ChunkOptions } from "./run";
export { createReplicationRunner, ThreadRunner, InlineRunner, type ReplicationRunner, type ReplicationRequest } from "./pool";
