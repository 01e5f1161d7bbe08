// `npm start`: the whole product on this machine, under one supervisor. Ctrl-C stops everything.
import { demoAccounts } from "../../db/demo-data";
import { ensureAuthSecret, loadEnvFile } from "./environment";
import { workerCount } from "./processes";
import { StackError, startStack } from "./stack";

const log = (line: string) => console.log(`[spillway] ${line}`);

async function main() {
  loadEnvFile();
  ensureAuthSecret(log);
  const stack = await startStack({
    profile: "dev",
    webPort: Number(process.env.PORT ?? 3000),
    smtpPort: Number(process.env.SPILLWAY_SMTP_PORT ?? 2525),
    freshDatabase: false,
    log,
  });
  let stopping = false;
  const shutdown = async (reason: string, code: number) => {
    if (stopping) return;
    stopping = true;
    log(`${reason}; stopping web, worker, mail and PostgreSQL ...`);
    await stack.stop();
    log("Stopped.");
    process.exit(code);
  };
  stack.supervisor.onUnexpectedExit = (name, code) => void shutdown(`${name} exited unexpectedly (status ${code})`, 1);
  // A worker that dies is started again; its unfinished chunks go to the other workers meanwhile.
  stack.supervisor.onRestart = (name, code, delayMs) => log(`${name} exited (status ${code}); starting it again in ${delayMs / 1000} s. The web server keeps serving.`);
  process.on("SIGINT", () => void shutdown("Interrupted", 0));
  process.on("SIGTERM", () => void shutdown("Terminated", 0));

  const width = Math.max(...demoAccounts.map((a) => a.email.length));
  console.log(
    [
      "",
      `Spillway is running at ${stack.appUrl} with ${workerCount()} worker process${workerCount() === 1 ? "" : "es"} (SPILLWAY_WORKERS; \`npm run worker\` adds one, on any machine that reaches the database).`,
      stack.env.SPILLWAY_FAKE_MAIL === "1" ? `Outgoing mail is captured locally; admins read it under Workspace → Mailbox.` : `Mail goes out through SMTP_URL.`,
      "",
      "Demo accounts (e-mail, password, roles):",
      ...demoAccounts.map(
        (a) =>
          `  ${a.email.padEnd(width)}  ${a.password.padEnd(24)}  ${Object.entries(a.roles)
            .filter(([, role]) => role)
            .map(([slug, role]) => `${role} in ${slug}`)
            .join(", ")}`,
      ),
      "",
      "Press Ctrl-C to stop.",
    ].join("\n"),
  );
}

main().catch((error) => {
  console.error(`[spillway] could not start: ${error.message}`);
  process.exit(error instanceof StackError ? error.exitCode : 1);
});
