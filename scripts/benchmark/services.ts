// What the benchmark starts and stops: the project's PostgreSQL (scripts/postgres.mjs),
// a fresh benchmark database, the production build, the local SMTP and S3 fakes, and the
// production server (scripts/server.mjs) on a free loopback port, which the crash test
// kills with SIGKILL and starts again.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { createWriteStream, existsSync, mkdtempSync, type WriteStream } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { migrateDatabase } from "../migrate.ts";
import { startSmtpCatcher } from "../fakes/smtp.ts";
import { startS3Fake } from "../fakes/s3.ts";
import { sleep } from "./stats.ts";

export const ROOT = path.resolve(import.meta.dirname, "../..");

type Cluster = {
  startPostgres(options?: { fast?: boolean }): Promise<{ started: boolean }>;
  stopPostgres(): boolean;
  databaseUrl(name: string): string;
  dataDir: string;
  pgPort: number;
};

/** scripts/postgres.mjs, the project's own cluster (plain JavaScript, so loaded untyped). */
export async function cluster(): Promise<Cluster> {
  return (await import(new URL("../postgres.mjs", import.meta.url).href)) as Cluster;
}

export async function withClient<T>(url: string, fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/** Drops and re-creates the benchmark database, then applies the committed migrations. */
export async function freshDatabase(c: Cluster, name: string): Promise<string> {
  await withClient(c.databaseUrl("postgres"), async (admin) => {
    await admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await admin.query(`CREATE DATABASE "${name}"`);
  });
  const url = c.databaseUrl(name);
  await migrateDatabase(url);
  return url;
}

export async function dropDatabase(c: Cluster, name: string) {
  await withClient(c.databaseUrl("postgres"), (admin) => admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`));
}

/** Builds the app when build/ is missing (the benchmark measures whatever build is there otherwise). */
export function buildIfMissing(): boolean {
  if (existsSync(path.join(ROOT, "build/server/index.js")) && existsSync(path.join(ROOT, "build/client/assets"))) return false;
  const result = spawnSync(process.execPath, ["node_modules/@react-router/dev/bin.js", "build"], { cwd: ROOT, stdio: "inherit" });
  if (result.status !== 0) throw new Error("the build failed");
  return true;
}

export function scratchDir(): string {
  return mkdtempSync(path.join(os.tmpdir(), "blindcut-benchmark-"));
}

/** The local SMTP catcher and S3 fake, in this process, on free ports. */
export async function startFakes(dir: string) {
  const smtp = await startSmtpCatcher({ port: 0, dir: path.join(dir, "mail") });
  const bucket = "blindcut-bench";
  const s3 = await startS3Fake({ port: 0, dir: path.join(dir, "s3"), bucket });
  return {
    env: {
      SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
      MAIL_CATCH_DIR: path.join(dir, "mail"),
      S3_ENDPOINT: `http://127.0.0.1:${s3.port}`,
      S3_BUCKET: bucket,
      S3_REGION: "us-east-1",
      S3_ACCESS_KEY_ID: "S3RVER",
      S3_SECRET_ACCESS_KEY: "S3RVER",
    },
    close: () => Promise.allSettled([smtp.close(), s3.close()]),
  };
}

/** A free TCP port on loopback. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      server.close(() => (typeof address === "object" && address ? resolve(address.port) : reject(new Error("no port"))));
    });
  });
}

/** The production server, started as `node scripts/server.mjs` (never through npx, so its pid is the server's). */
export class AppServer {
  private child: ChildProcess | null = null;
  private log: WriteStream;
  readonly origin: string;

  constructor(
    readonly port: number,
    private readonly env: Record<string, string>,
    logFile: string,
    private readonly nodeArgs: string[] = [],
  ) {
    this.origin = `http://127.0.0.1:${port}`;
    this.log = createWriteStream(logFile, { flags: "a" });
  }

  get pid() {
    return this.child?.pid ?? null;
  }

  async start(extraNodeArgs: string[] = []) {
    if (this.child) throw new Error("the app server is already running");
    const child = spawn(process.execPath, [...this.nodeArgs, ...extraNodeArgs, "scripts/server.mjs"], {
      cwd: ROOT,
      env: { ...process.env, ...this.env, NODE_ENV: "production", PORT: String(this.port), HOST: "127.0.0.1", APP_URL: this.origin },
      stdio: ["ignore", "pipe", "pipe"],
    });
    child.stdout!.pipe(this.log, { end: false });
    child.stderr!.pipe(this.log, { end: false });
    this.child = child;
    child.once("exit", () => {
      if (this.child === child) this.child = null;
    });
    for (let i = 0; i < 300; i++) {
      if (child.exitCode !== null || child.signalCode !== null) throw new Error(`the app server exited during start-up (see ${this.log.path})`);
      try {
        if ((await fetch(`${this.origin}/healthz`)).ok) return;
      } catch {
        // not listening yet
      }
      await sleep(50);
    }
    throw new Error("the app server did not become healthy in 15 s");
  }

  private async stopWith(signal: NodeJS.Signals) {
    const child = this.child;
    if (!child) return;
    const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
    child.kill(signal);
    const timeout = sleep(10_000).then(() => "timeout");
    if ((await Promise.race([exited, timeout])) === "timeout") {
      child.kill("SIGKILL");
      await exited;
    }
    this.child = null;
  }

  /** Graceful stop (SIGTERM), as an operator would. */
  stop() {
    return this.stopWith("SIGTERM");
  }

  /** The crash: SIGKILL, no chance to finish a request or close a connection. */
  kill() {
    return this.stopWith("SIGKILL");
  }

  close() {
    this.log.end();
  }
}
