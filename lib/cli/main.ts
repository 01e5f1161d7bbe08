import { ZodError } from "zod";
import { analyticCommands } from "./analytic-commands";
import { simulationCommands } from "./simulation-commands";
import { remoteCommands } from "./remote-commands";
import { CliUsageError, isInputError, type CliCommand } from "./command";

const commands: CliCommand[] = [...analyticCommands, ...simulationCommands, ...remoteCommands];

function usage(): string {
  const width = Math.max(...commands.map((c) => c.name.length), 4);
  return [
    "usage: npm run -s cli -- <command> [--flag value ...] [--json]",
    "",
    ...commands.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`),
  ].join("\n");
}

/** One line naming the offending field, for stderr. */
export function describeError(error: unknown): string {
  if (error instanceof ZodError) {
    return error.issues.map((issue) => `${issue.path.length ? issue.path.join(".") : "input"}: ${issue.message}`).join("; ");
  }
  return error instanceof Error ? error.message.replace(/\s*\n\s*/g, " ") : String(error);
}

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === "help" || name === "--help") {
    console.log(usage());
    return name ? 0 : 2;
  }
  const command = commands.find((c) => c.name === name);
  if (!command) {
    console.error(`unknown command "${name}"; run "npm run -s cli -- help" for the list`);
    return 2;
  }
  const json = rest.includes("--json");
  const args = rest.filter((a) => a !== "--json");
  try {
    const output = await command.run(args);
    process.stdout.write(json ? `${JSON.stringify(output.json)}\n` : `${output.table}\n`);
    return 0;
  } catch (error) {
    if (error instanceof ZodError || error instanceof CliUsageError || isInputError(error)) {
      console.error(`${command.name}: ${describeError(error)}`);
      return 2;
    }
    if ((error as { kind?: unknown }).kind === "convergence") {
      // The inputs are valid but outside where the method converges: still the caller's choice to change.
      console.error(`${command.name}: did not converge: ${describeError(error)}`);
      return 2;
    }
    if ((error as { kind?: unknown }).kind === "remote") {
      // The server, the connection or the remote run failed: say so plainly, exit 1.
      console.error(`${command.name}: ${describeError(error)}`);
      return 1;
    }
    console.error(`${command.name}: internal error: ${describeError(error)}`);
    return 1;
  }
}

main(process.argv.slice(2)).then((code) => {
  process.exitCode = code;
});
