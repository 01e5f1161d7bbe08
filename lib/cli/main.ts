import { ZodError } from "zod";
import { CliUsageError, isInputError, type CliCommand } from "./command";

// Each command module is loaded only when one of its commands runs (or for help): `simulate` then
// skips the analytic command table, and `erlang-b` the simulation engine and its references.
const analytic = async () => (await import("./analytic-commands")).analyticCommands;
const simulation = async () => (await import("./simulation-commands")).simulationCommands;
const remote = async () => (await import("./remote-commands")).remoteCommands;

/** Every command module, in the order help lists them. */
const modules = [analytic, simulation, remote];

/** The module of each command outside the analytic table (which has one command per analytic operation). */
const commandModules: Record<string, () => Promise<CliCommand[]>> = { plan: simulation, simulate: simulation, submit: remote };

/** The named command; a name missing from `commandModules` still works, at the cost of loading every module. */
async function findCommand(name: string): Promise<CliCommand | undefined> {
  const likely = (await (commandModules[name] ?? analytic)()).find((c) => c.name === name);
  return likely ?? (await allCommands()).find((c) => c.name === name);
}

async function allCommands(): Promise<CliCommand[]> {
  return (await Promise.all(modules.map((load) => load()))).flat();
}

function usage(commands: CliCommand[]): string {
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
    console.log(usage(await allCommands()));
    return name ? 0 : 2;
  }
  const command = await findCommand(name);
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
    if (error instanceof CliUsageError) {
      // One line per problem: the analytic commands report every bad flag at once, one a line.
      for (const line of error.message.split("\n").filter((l) => l.trim())) console.error(`${command.name}: ${line.trim()}`);
      return 2;
    }
    if (error instanceof ZodError || isInputError(error)) {
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
