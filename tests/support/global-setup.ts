// Once per test run: a migrated template database, and the local SMTP and S3 fakes.
import type { TestProject } from "vitest/node";
import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { migrateDatabase } from "../../scripts/migrate.ts";
import { startSmtpCatcher } from "../../scripts/fakes/smtp.ts";
import { startS3Fake } from "../../scripts/fakes/s3.ts";
import { databaseUrlFor, withAdmin } from "./pg-admin.ts";

declare module "vitest" {
  export interface ProvidedContext {
    templateDb: string;
    runTag: string;
    mailDir: string;
    smtpUrl: string;
    s3Endpoint: string;
    s3Bucket: string;
  }
}

export default async function setup(project: TestProject) {
  // Names carry this run's tag, so two test runs on one machine never drop each other's databases.
  const runTag = `${project.name.slice(0, 3)}${process.pid}`;
  const templateDb = `blindcut_template_${runTag}`;
  await withAdmin(async (c) => {
    await c.query(`DROP DATABASE IF EXISTS "${templateDb}" WITH (FORCE)`);
    await c.query(`CREATE DATABASE "${templateDb}"`);
  });
  await migrateDatabase(databaseUrlFor(templateDb));

  const scratch = mkdtempSync(path.join(os.tmpdir(), `blindcut-${project.name}-`));
  const mailDir = path.join(scratch, "mail");
  const smtp = await startSmtpCatcher({ port: 0, dir: mailDir });
  const s3Bucket = "blindcut-test";
  const s3 = await startS3Fake({ port: 0, dir: path.join(scratch, "s3"), bucket: s3Bucket });

  // The browser-test server setup runs next in this same process and reads these.
  Object.assign(process.env, {
    BLINDCUT_TEST_TEMPLATE_DB: templateDb,
    BLINDCUT_TEST_MAIL_DIR: mailDir,
    BLINDCUT_TEST_SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
    BLINDCUT_TEST_S3_ENDPOINT: `http://127.0.0.1:${s3.port}`,
    BLINDCUT_TEST_S3_BUCKET: s3Bucket,
  });
  project.provide("templateDb", templateDb);
  project.provide("runTag", runTag);
  process.env.BLINDCUT_TEST_RUN_TAG = runTag;
  project.provide("mailDir", mailDir);
  project.provide("smtpUrl", `smtp://127.0.0.1:${smtp.port}`);
  project.provide("s3Endpoint", `http://127.0.0.1:${s3.port}`);
  project.provide("s3Bucket", s3Bucket);

  return async () => {
    await Promise.allSettled([smtp.close(), s3.close()]);
    await withAdmin(async (c) => {
      const own = await c.query(`SELECT datname FROM pg_database WHERE datname LIKE $1`, [`blindcut_%${runTag}%`]);
      for (const row of own.rows) await c.query(`DROP DATABASE IF EXISTS "${row.datname}" WITH (FORCE)`);
    });
  };
}
