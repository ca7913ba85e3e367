// A local SMTP server that catches every message into a folder as JSON, so the
// development mail page and the browser tests can read it back.
import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { randomUUID } from "node:crypto";

export async function startSmtpCatcher(options: { port: number; dir: string }) {
  mkdirSync(options.dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const to = Array.isArray(mail.to) ? mail.to.flatMap((a) => a.value) : (mail.to?.value ?? []);
          const record = {
            id: randomUUID(),
            receivedAt: new Date().toISOString(),
            from: mail.from?.text ?? "",
            to: to.map((a) => a.address ?? ""),
            subject: mail.subject ?? "",
            text: mail.text ?? "",
            html: typeof mail.html === "string" ? mail.html : "",
          };
          const name = `${record.receivedAt.replace(/[:.]/g, "-")}-${record.id}.json`;
          writeFileSync(path.join(options.dir, name), JSON.stringify(record, null, 2));
          callback();
        })
        .catch(callback);
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, "127.0.0.1", () => resolve());
  });
  const address = (server as unknown as { server: import("node:net").Server }).server.address();
  const port = typeof address === "object" && address ? address.port : options.port;
  return { port, close: () => new Promise<void>((r) => server.close(() => r())) };
}
