// The start and test commands on a busy machine: a taken port gives one line naming the
// service, the port and the variable that moves it; a failed start stops what it started;
// a throw-away checkout's test cluster is removed; folders of vanished checkouts are pruned.
// Every run here uses its own throw-away BLINDCUT_PG_DATA under a temporary folder and a free
// BLINDCUT_PG_PORT, so no cluster of any checkout is touched.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawn, spawnSync } from "node:child_process";
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";

const ROOT = path.resolve(import.meta.dirname, "../../..");
const tsx = path.join(ROOT, "node_modules/tsx/dist/cli.mjs");
const stackLine = /^\s+at .+\(.+:\d+:\d+\)$|^\s+at .+:\d+:\d+$/m;

let scratch = "";
const held: net.Server[] = [];

beforeAll(() => {
  scratch = mkdtempSync(path.join(os.tmpdir(), "blindcut-start-"));
  // PostgreSQL runs as its own system user, which must reach the data folder.
  chmodSync(scratch, 0o755);
});

afterAll(() => {
  for (const server of held) server.close();
  // Stop any cluster a failed assertion left behind: only clusters under this test's folder.
  for (const name of readdirSync(scratch)) {
    const dir = path.join(scratch, name);
    if (existsSync(path.join(dir, "postmaster.pid"))) {
      spawnSync("runuser", ["-u", "postgres", "--", "/usr/lib/postgresql/15/bin/pg_ctl", "-D", dir, "-m", "immediate", "stop"]);
    }
  }
  rmSync(scratch, { recursive: true, force: true });
});

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const a = s.address();
      s.close(() => resolve(typeof a === "object" && a ? a.port : 0));
    });
  });
}

/** Listens on a port for the rest of the file, as "another program" would. */
async function holdPort(host = "127.0.0.1", port = 0): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((resolve, reject) => {
    s.once("error", reject);
    s.listen(port, host, () => resolve());
  });
  held.push(s);
  const a = s.address();
  return typeof a === "object" && a ? a.port : port;
}

type Result = { code: number | null; out: string };

function run(args: string[], env: Record<string, string | undefined>, timeoutMs = 90_000): Promise<Result> {
  const full: Record<string, string> = {};
  for (const [k, v] of Object.entries({ ...process.env, ...env })) if (v !== undefined) full[k] = v;
  for (const k of ["CI", "BLINDCUT_KEEP_DB", "BLINDCUT_SMTP_PORT", "BLINDCUT_S3_PORT", "HOST", "DATABASE_URL"]) {
    if (!(k in env)) delete full[k];
  }
  return new Promise((resolve) => {
    const child = spawn(process.execPath, args, { cwd: ROOT, env: full, stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
    child.on("exit", (code) => {
      clearTimeout(timer);
      resolve({ code, out });
    });
  });
}

/** Environment of a throw-away cluster under this test's folder. */
async function cluster(name: string) {
  const dataDir = path.join(scratch, name);
  return { dataDir, env: { BLINDCUT_PG_PORT: String(await freePort()), BLINDCUT_PG_DATA: dataDir } };
}

/** Processes whose command line names this data folder (a PostgreSQL left running). */
function processesOf(dataDir: string) {
  return readdirSync("/proc")
    .filter((d) => /^\d+$/.test(d))
    .filter((pid) => {
      try {
        return readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").includes(dataDir);
      } catch {
        return false;
      }
    });
}

describe("a taken port gives one line naming the service, the port and its variable", () => {
  it("PostgreSQL: start, test and db:start stop before creating anything", async () => {
    const { dataDir, env } = await cluster("pg-taken");
    const port = await holdPort();
    for (const command of ["db:start", "start", "test"]) {
      const r = await run(["scripts/bootstrap.mjs", command], { ...env, BLINDCUT_PG_PORT: String(port), PORT: String(await freePort()) });
      expect(r.code, r.out).toBe(1);
      expect(r.out).toMatch(new RegExp(`PostgreSQL cannot listen on 127\\.0\\.0\\.1:${port}: the port is taken by another program \\(pid ${process.pid}\\b.*set BLINDCUT_PG_PORT to a free port`));
      expect(r.out).not.toMatch(stackLine);
      expect(existsSync(dataDir)).toBe(false);
    }
  });

  it("the app: the start stops before PostgreSQL starts", async () => {
    const { dataDir, env } = await cluster("app-taken");
    const port = await holdPort("0.0.0.0");
    const r = await run(["scripts/bootstrap.mjs", "start"], { ...env, PORT: String(port) });
    expect(r.code, r.out).toBe(1);
    expect(r.out).toMatch(new RegExp(`The app cannot listen on 0\\.0\\.0\\.0:${port}: the port is taken by another program.*set PORT to a free port`));
    expect(r.out).not.toMatch(stackLine);
    expect(existsSync(dataDir)).toBe(false);
  });

  it("the app server itself, when the port is taken after the start command looked", async () => {
    const port = await holdPort("127.0.0.1");
    const r = await run(["scripts/server.mjs"], {
      NODE_ENV: "production",
      APP_URL: "http://127.0.0.1",
      PORT: String(port),
      HOST: "127.0.0.1",
      DATABASE_URL: "postgres://postgres@127.0.0.1:1/none",
      SESSION_SECRET: "test-session-secret-0123456789abcdef0123456789",
      SMTP_URL: "smtp://127.0.0.1:1",
      S3_ENDPOINT: "http://127.0.0.1:1",
      S3_BUCKET: "none",
      S3_ACCESS_KEY_ID: "x",
      S3_SECRET_ACCESS_KEY: "x",
    }, 30_000);
    expect(r.code, r.out).toBe(2);
    expect(r.out).toMatch(new RegExp(`The app cannot listen on 127\\.0\\.0\\.1:${port}: the port is taken by another program.*set PORT to a free port`));
    expect(r.out).not.toMatch(stackLine);
  }, 30_000);

  it("the S3 and SMTP fakes: a port set explicitly must be free", async () => {
    const localDir = mkdtempSync(path.join(scratch, "fakes-"));
    const taken = await holdPort();
    const s3 = await run([tsx, "scripts/local-services.ts"], { BLINDCUT_LOCAL_DIR: localDir, BLINDCUT_SMTP_PORT: "0", BLINDCUT_S3_PORT: String(taken) }, 30_000);
    expect(s3.code, s3.out).toBe(2);
    expect(s3.out).toMatch(new RegExp(`The local S3 fake cannot listen on 127\\.0\\.0\\.1:${taken}: the port is taken by another program.*set BLINDCUT_S3_PORT to a free port`));
    expect(s3.out).not.toMatch(stackLine);
    const smtp = await run([tsx, "scripts/local-services.ts"], { BLINDCUT_LOCAL_DIR: localDir, BLINDCUT_SMTP_PORT: String(taken), BLINDCUT_S3_PORT: "0" }, 30_000);
    expect(smtp.code, smtp.out).toBe(2);
    expect(smtp.out).toMatch(new RegExp(`The local SMTP fake cannot listen on 127\\.0\\.0\\.1:${taken}: .*set BLINDCUT_SMTP_PORT to a free port`));
    expect(smtp.out).not.toMatch(stackLine);
    expect(existsSync(path.join(localDir, "services.json"))).toBe(false);
  }, 60_000);

  it("the fakes: a taken default port is replaced by a free one, and the start says which", async () => {
    const localDir = mkdtempSync(path.join(scratch, "fakes-"));
    // 2525 is the SMTP fake's default; another checkout's fake may hold it already, which is the same case.
    await holdPort("127.0.0.1", 2525).catch(() => undefined);
    const child = spawn(process.execPath, [tsx, "scripts/local-services.ts"], {
      cwd: ROOT,
      env: { ...process.env, BLINDCUT_LOCAL_DIR: localDir, BLINDCUT_SMTP_PORT: "", BLINDCUT_S3_PORT: "0" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const file = path.join(localDir, "services.json");
    for (let i = 0; i < 200 && !existsSync(file) && child.exitCode === null; i++) await new Promise((r) => setTimeout(r, 100));
    child.kill("SIGTERM");
    await new Promise((r) => child.once("exit", r));
    expect(existsSync(file), out).toBe(true);
    const smtpUrl = JSON.parse(readFileSync(file, "utf8")).env.SMTP_URL as string;
    const port = Number(new URL(smtpUrl).port);
    expect(port).not.toBe(2525);
    expect(out).toMatch(/The local SMTP fake: port 2525 is taken by (another program|this checkout's local fakes).*, so a free port is used instead \(BLINDCUT_SMTP_PORT sets one\)\./);
    expect(out).toContain(`local SMTP on 127.0.0.1:${port}`);
  }, 30_000);
});

describe("a failed start stops everything it started", () => {
  it("a start whose SMTP port is taken exits non-zero with the line, leaves no PostgreSQL and no pid file; the next run starts cleanly", async () => {
    const { dataDir, env } = await cluster("pg-smtp-taken");
    // A folder of a vanished checkout beside it, so the start's offer to prune shows.
    mkdirSync(path.join(scratch, "pg-vanished-1"));
    writeFileSync(path.join(scratch, "pg-vanished-1.checkout"), JSON.stringify({ checkout: path.join(scratch, "no-such-checkout") }));
    const smtpPort = await holdPort();
    const runEnv = { ...env, PORT: String(await freePort()), BLINDCUT_SMTP_PORT: String(smtpPort), BLINDCUT_S3_PORT: "0" };
    for (let attempt = 0; attempt < 2; attempt++) {
      const r = await run(["scripts/bootstrap.mjs", "start"], runEnv);
      expect(r.code, r.out).toBe(1);
      expect(r.out).toContain(`PostgreSQL started on 127.0.0.1:${env.BLINDCUT_PG_PORT}`);
      expect(r.out).toMatch(new RegExp(`The local SMTP fake cannot listen on 127\\.0\\.0\\.1:${smtpPort}: the port is taken by another program.*BLINDCUT_SMTP_PORT`));
      expect(r.out).toContain("PostgreSQL stopped");
      expect(r.out).toContain("1 PostgreSQL data folder(s) under");
      expect(r.out).not.toMatch(stackLine);
      expect(processesOf(dataDir)).toEqual([]);
      expect(existsSync(path.join(dataDir, "postmaster.pid"))).toBe(false);
      // A checkout that still exists keeps its data.
      expect(existsSync(path.join(dataDir, "PG_VERSION"))).toBe(true);
    }
  }, 180_000);
});

describe("data folders of clusters whose checkout is gone", () => {
  it("with CI=true the test command removes the cluster it created, and the count stays the last line", async () => {
    const { dataDir, env } = await cluster("pg-ci");
    const r = await run(["scripts/bootstrap.mjs", "test", "--quick", "--project", "unit", "tests/unit/env.test.ts"], { ...env, CI: "true" }, 120_000);
    expect(r.code, r.out).toBe(0);
    const lines = r.out.trim().split("\n");
    expect(lines.at(-1)).toMatch(/^[1-9]\d* passed, 0 failed$/);
    expect(r.out).toContain("removed this throw-away checkout's test cluster");
    for (const p of [dataDir, `${dataDir}-sock`, `${dataDir}.log`, `${dataDir}.checkout`, `${dataDir}.users`]) expect(existsSync(p), p).toBe(false);
    expect(processesOf(dataDir)).toEqual([]);
  }, 150_000);

  it("with CI=true a cluster the run did not create is stopped but kept", async () => {
    const { dataDir, env } = await cluster("pg-ci-existing");
    const init = await run(["scripts/bootstrap.mjs", "db:start"], env);
    expect(init.code, init.out).toBe(0);
    const stop = await run(["scripts/bootstrap.mjs", "db:stop"], env);
    expect(stop.code, stop.out).toBe(0);
    const r = await run(["scripts/bootstrap.mjs", "test", "--quick", "--project", "unit", "tests/unit/env.test.ts"], { ...env, CI: "true" }, 120_000);
    expect(r.code, r.out).toBe(0);
    expect(r.out.trim().split("\n").at(-1)).toMatch(/^[1-9]\d* passed, 0 failed$/);
    expect(existsSync(path.join(dataDir, "PG_VERSION"))).toBe(true);
    expect(existsSync(path.join(dataDir, "postmaster.pid"))).toBe(false);
    expect(processesOf(dataDir)).toEqual([]);
  }, 180_000);

  it("db:prune removes folders whose checkout is gone, never a live checkout's or a running one", async () => {
    const root = mkdtempSync(path.join(scratch, "root-"));
    const make = (name: string, checkout: string | null, pidFile?: number) => {
      const dir = path.join(root, name);
      mkdirSync(dir);
      mkdirSync(`${dir}-sock`);
      writeFileSync(`${dir}.log`, "");
      if (checkout) writeFileSync(`${dir}.checkout`, JSON.stringify({ checkout }));
      if (pidFile) writeFileSync(path.join(dir, "postmaster.pid"), `${pidFile}\n${dir}\n`);
      return dir;
    };
    const gone = make("pg-gone-1", path.join(root, "deleted-clone"));
    const live = make("pg-live-2", ROOT);
    const unknown = make("pg-unknown-3", null);
    const running = make("pg-running-4", path.join(root, "deleted-too"), process.pid);
    const r = await run(["scripts/bootstrap.mjs", "db:prune"], { BLINDCUT_PG_DATA: path.join(root, "pg-self"), BLINDCUT_PG_PORT: "1" });
    expect(r.code, r.out).toBe(0);
    expect(r.out).toContain(`removed ${gone}`);
    for (const p of [gone, `${gone}-sock`, `${gone}.log`, `${gone}.checkout`]) expect(existsSync(p), p).toBe(false);
    for (const dir of [live, unknown, running]) expect(existsSync(dir), dir).toBe(true);
    expect(existsSync(`${live}.checkout`)).toBe(true);
  });
});
