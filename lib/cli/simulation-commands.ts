import type { CliCommand } from "./command";

export const simulationCommands: CliCommand[] = [];
