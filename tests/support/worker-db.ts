// Before each integration test file: its own database cloned from the template,
// and the environment the app's server modules read.
import { inject } from "vitest";
import { cloneTemplate } from "./pg-admin.ts";

const worker = process.env.VITEST_POOL_ID ?? "0";
process.env.NODE_ENV = "test";
process.env.DATABASE_URL = await cloneTemplate(`blindcut_test_${inject("runTag")}_${worker}`, inject("templateDb"));
process.env.SMTP_URL = inject("smtpUrl");
process.env.MAIL_CATCH_DIR = inject("mailDir");
process.env.S3_ENDPOINT = inject("s3Endpoint");
process.env.S3_BUCKET = inject("s3Bucket");
process.env.S3_ACCESS_KEY_ID = "S3RVER";
process.env.S3_SECRET_ACCESS_KEY = "S3RVER";
process.env.BLINDCUT_INSECURE_COOKIES = "1";
process.env.APP_URL = "http://localhost";
