// Starts the local fakes of the hosted services (SMTP, S3) for `npm start` and
// `npm run dev`, and writes where they listen to .blindcut/services.json.
import { writeFileSync } from "node:fs";
import path from "node:path";
import { startSmtpCatcher } from "./fakes/smtp.ts";
import { startS3Fake } from "./fakes/s3.ts";

const localDir = process.env.BLINDCUT_LOCAL_DIR ?? path.resolve(".blindcut");
const smtp = await startSmtpCatcher({ port: Number(process.env.BLINDCUT_SMTP_PORT ?? 2525), dir: path.join(localDir, "mail") });
const bucket = "blindcut-local";
const s3 = await startS3Fake({ port: Number(process.env.BLINDCUT_S3_PORT ?? 4569), dir: path.join(localDir, "s3"), bucket });

const env = {
  SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
  MAIL_CATCH_DIR: path.join(localDir, "mail"),
  S3_ENDPOINT: `http://127.0.0.1:${s3.port}`,
  S3_BUCKET: bucket,
  S3_REGION: "us-east-1",
  S3_ACCESS_KEY_ID: "S3RVER",
  S3_SECRET_ACCESS_KEY: "S3RVER",
};
writeFileSync(path.join(localDir, "services.json"), JSON.stringify({ env }, null, 2));
console.log(`[blindcut] local SMTP on 127.0.0.1:${smtp.port}, local S3 on 127.0.0.1:${s3.port}`);

const stop = async () => {
  await Promise.allSettled([smtp.close(), s3.close()]);
  process.exit(0);
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
