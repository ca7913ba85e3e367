// Starts the local fakes of the hosted services (SMTP, S3) for `npm start` and
// `npm run dev`, and writes where they listen to .blindcut/services.json.
// Nobody connects to them from outside, so a taken default port is replaced by a
// free one (and said so); a port set explicitly must be free, or the start stops.
import { writeFileSync } from "node:fs";
import path from "node:path";
import { startSmtpCatcher } from "./fakes/smtp.ts";
import { startS3Fake } from "./fakes/s3.ts";
import { describeHolder, portFree, portTakenMessage } from "./ports.mjs";

const host = "127.0.0.1";
const localDir = process.env.BLINDCUT_LOCAL_DIR ?? path.resolve(".blindcut");
const log = (msg: string) => console.log(`[blindcut] ${msg}`);

/** The port a fake listens on: the variable's value, else its default, else (default taken) any free port. */
async function choosePort(service: string, variable: string, fallback: number): Promise<number> {
  const set = process.env[variable];
  if (set !== undefined && set !== "") {
    const port = Number(set);
    if (!Number.isInteger(port) || port < 0 || port > 65535) fail(`${variable} must be a port number (0-65535), not "${set}".`);
    if (port !== 0 && !(await portFree(port, host))) fail(portTakenMessage({ service, port, host, variable, hint: "(or leave it unset to let the start command pick one)" }));
    return port;
  }
  if (await portFree(fallback, host)) return fallback;
  log(`${service}: port ${fallback} is taken by ${describeHolder(fallback)}, so a free port is used instead (${variable} sets one).`);
  return 0;
}

function fail(line: string): never {
  console.error(`[blindcut] ${line}`);
  // 2: already reported in one line; the start command adds no stack trace.
  process.exit(2);
}

const smtpPort = await choosePort("The local SMTP fake", "BLINDCUT_SMTP_PORT", 2525);
const s3Port = await choosePort("The local S3 fake", "BLINDCUT_S3_PORT", 4569);

let smtp: Awaited<ReturnType<typeof startSmtpCatcher>>;
let s3: Awaited<ReturnType<typeof startS3Fake>>;
try {
  smtp = await startSmtpCatcher({ port: smtpPort, dir: path.join(localDir, "mail") });
} catch (err) {
  // Taken between the check and the listen.
  fail(portTakenMessage({ service: "The local SMTP fake", port: smtpPort, host, variable: "BLINDCUT_SMTP_PORT" }) + ` (${(err as Error).message})`);
}
try {
  s3 = await startS3Fake({ port: s3Port, dir: path.join(localDir, "s3"), bucket: "blindcut-local" });
} catch (err) {
  await smtp.close();
  fail(portTakenMessage({ service: "The local S3 fake", port: s3Port, host, variable: "BLINDCUT_S3_PORT" }) + ` (${(err as Error).message})`);
}

const env = {
  SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
  MAIL_CATCH_DIR: path.join(localDir, "mail"),
  S3_ENDPOINT: `http://127.0.0.1:${s3.port}`,
  S3_BUCKET: "blindcut-local",
  S3_REGION: "us-east-1",
  S3_ACCESS_KEY_ID: "S3RVER",
  S3_SECRET_ACCESS_KEY: "S3RVER",
};
writeFileSync(path.join(localDir, "services.json"), JSON.stringify({ env }, null, 2));
log(`local SMTP on 127.0.0.1:${smtp.port}, local S3 on 127.0.0.1:${s3.port}`);

const stop = async () => {
  await Promise.allSettled([smtp.close(), s3.close()]);
  process.exit(0);
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
