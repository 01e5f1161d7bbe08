// The background worker: pg-boss on the same PostgreSQL. Handlers are registered per queue as features land.
import PgBoss from "pg-boss";
import { allQueueNames } from "../lib/jobs/contracts";

export async function startWorker(databaseUrl: string, log: (line: string) => void = console.log) {
  const boss = new PgBoss({ connectionString: databaseUrl, application_name: "spillway-worker" });
  boss.on("error", (error) => log(`pg-boss error: ${error.message}`));
  await boss.start();
  // createQueue is required before send or work, or sends return null and jobs are lost; it is idempotent.
  for (const name of allQueueNames) await boss.createQueue(name);
  log(`worker ready; queues: ${allQueueNames.join(", ")}`);
  return {
    boss,
    stop: () =>
      new Promise<void>((resolve) => {
        // stop() can resolve before jobs finish; the 'stopped' event is the reliable signal.
        boss.once("stopped", () => resolve());
        boss.stop({ graceful: true, wait: true, timeout: 20_000 }).catch(() => resolve());
      }),
  };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error("worker: DATABASE_URL is not set");
    process.exit(2);
  }
  startWorker(url).then(
    (worker) => {
      const stop = () => worker.stop().then(() => process.exit(0));
      process.once("SIGTERM", stop);
      process.once("SIGINT", stop);
    },
    (error) => {
      console.error(`worker: ${error.message}`);
      process.exit(1);
    },
  );
}
