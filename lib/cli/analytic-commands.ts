import type { CliCommand } from "./command";

export const analyticCommands: CliCommand[] = [];
