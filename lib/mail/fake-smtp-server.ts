// Loopback SMTP receiver for dev and tests: stores every message in captured_mail, sends nothing onward.
import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import { createDatabase } from "../../db/client";
import { capturedMail } from "../../db/schema";
import { mailHeaders } from "./transport";
import { databaseUrl, mailConfig } from "../config";

const header = (parsed: { headers: Map<string, unknown> }, name: string): string | null => {
  const value = parsed.headers.get(name);
  return typeof value === "string" && value.trim() ? value.trim() : null;
};

export function startFakeSmtpServer(options: { port: number; databaseUrl: string }): Promise<{ close(): Promise<void> }> {
  const { db, pool } = createDatabase(options.databaseUrl, 2);
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          await db.insert(capturedMail).values({
            envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
            envelopeTo: session.envelope.rcptTo.map((r) => r.address.toLowerCase()),
            subject: parsed.subject ?? "",
            textBody: parsed.text ?? "",
            htmlBody: typeof parsed.html === "string" ? parsed.html : null,
            workspaceId: header(parsed, mailHeaders.workspace),
            kind: header(parsed, mailHeaders.kind) ?? "",
          });
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, "127.0.0.1", () =>
      resolve({
        close: () => new Promise<void>((done) => server.close(() => pool.end().then(() => done()))),
      }),
    );
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const port = mailConfig.fakePort();
  startFakeSmtpServer({ port, databaseUrl: databaseUrl() }).then(
    (handle) => {
      console.log(`fake SMTP receiver listening on 127.0.0.1:${port}`);
      const stop = () => handle.close().then(() => process.exit(0));
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
    },
    (error) => {
      console.error(`fake SMTP: ${error.message}`);
      process.exit(1);
    },
  );
}
