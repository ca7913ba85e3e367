// Once per browser-test run: the production build served by the project's own
// Express server on a private port, against a database of its own with demo data.
import type { TestProject } from "vitest/node";
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import net from "node:net";
import { cloneTemplate } from "./pg-admin.ts";

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    e2eDatabaseUrl: string;
  }
}

const ROOT = path.resolve(import.meta.dirname, "../..");

export default async function setup(project: TestProject) {
  const port = Number(process.env.BLINDCUT_E2E_PORT ?? (await freePort()));
  const t = process.env;
  const databaseUrl = await cloneTemplate(`blindcut_e2e_${t.BLINDCUT_TEST_RUN_TAG}`, t.BLINDCUT_TEST_TEMPLATE_DB!);
  const env = {
    ...process.env,
    NODE_ENV: "production",
    PORT: String(port),
    HOST: "127.0.0.1",
    DATABASE_URL: databaseUrl,
    SESSION_SECRET: "e2e-session-secret-0123456789abcdef0123456789",
    BLINDCUT_INSECURE_COOKIES: "1",
    BLINDCUT_DEMO_ACCOUNTS: "1",
    BLINDCUT_DEV_MAIL: "1",
    BLINDCUT_DEMO: "1",
    APP_URL: `http://127.0.0.1:${port}`,
    SMTP_URL: t.BLINDCUT_TEST_SMTP_URL,
    MAIL_CATCH_DIR: t.BLINDCUT_TEST_MAIL_DIR,
    S3_ENDPOINT: t.BLINDCUT_TEST_S3_ENDPOINT,
    S3_BUCKET: t.BLINDCUT_TEST_S3_BUCKET,
    S3_ACCESS_KEY_ID: "S3RVER",
    S3_SECRET_ACCESS_KEY: "S3RVER",
  };
  const tsx = path.join(ROOT, "node_modules/tsx/dist/cli.mjs");
  await runOnce(spawn(process.execPath, [tsx, "scripts/demo-data.ts"], { cwd: ROOT, env, stdio: "inherit" }));

  const server = spawn(process.execPath, ["scripts/server.mjs"], { cwd: ROOT, env, stdio: ["ignore", "inherit", "inherit"] });
  const baseUrl = `http://127.0.0.1:${port}`;
  await waitForHealth(baseUrl, server);
  project.provide("baseUrl", baseUrl);
  project.provide("e2eDatabaseUrl", databaseUrl);

  return async () => {
    server.kill("SIGTERM");
    await new Promise((r) => server.once("exit", r));
  };
}

/** A free port on loopback, so concurrent test runs never collide. */
function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      server.close(() => resolve(typeof address === "object" && address ? address.port : 3199));
    });
  });
}

function runOnce(child: ChildProcess) {
  return new Promise<void>((resolve, reject) =>
    child.once("exit", (code) => (code === 0 ? resolve() : reject(new Error(`demo data exited with ${code}`)))),
  );
}

async function waitForHealth(baseUrl: string, server: ChildProcess) {
  for (let i = 0; i < 200; i++) {
    if (server.exitCode !== null) throw new Error("the app server exited during start-up");
    try {
      const res = await fetch(`${baseUrl}/healthz`);
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("the app server did not become healthy in 20 s");
}
