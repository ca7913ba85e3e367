// Entry point of `npm start`, `npm test`, `npm run dev`, `npm run db:start|db:stop`.
// Node built-ins only until the npm packages are installed: it installs what is
// missing (Debian and npm packages), starts PostgreSQL and the local fakes, then
// hands over to the TypeScript scripts.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, statSync, mkdirSync, writeFileSync, readFileSync, rmSync, readdirSync } from "node:fs";
import path from "node:path";
import {
  startPostgres, stopPostgres, ensureDatabase, databaseUrl, postgresInstalled, pgPort, dataDir,
  postgresPortProblem, joinCluster, leaveCluster, keepRunning, removeCluster, orphanClusters, pruneOrphanClusters,
} from "./postgres.mjs";
import { portFree, portTakenMessage, UserFixableError } from "./ports.mjs";

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");
process.chdir(ROOT);
const command = process.argv[2] ?? "start";
const log = (msg) => console.log(`[blindcut] ${msg}`);

function run(cmd, args, opts = {}) {
  const result = spawnSync(cmd, args, { stdio: "inherit", ...opts });
  if (result.status !== 0) throw new Error(`${cmd} ${args.join(" ")} exited with ${result.status}`);
}

function ensureDebianPackages(pkgs) {
  const missing = pkgs.filter((p) => !p.present());
  if (missing.length === 0) return;
  const names = missing.map((p) => p.name);
  log(`installing Debian packages: ${names.join(", ")}`);
  const sudo = process.getuid?.() === 0 ? [] : ["sudo"];
  const apt = (args) => run(sudo[0] ?? "apt-get", sudo.length ? ["apt-get", ...args] : args, { env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
  apt(["update", "-qq"]);
  apt(["install", "-y", "-qq", "--no-install-recommends", ...names]);
}

const postgresql = { name: "postgresql", present: postgresInstalled };
const chromium = { name: "chromium", present: () => existsSync("/usr/bin/chromium") };
const poppler = { name: "poppler-utils", present: () => existsSync("/usr/bin/pdftoppm") };

function ensureNodeModules() {
  const stamp = "node_modules/.package-lock.json";
  if (existsSync(stamp) && statSync(stamp).mtimeMs >= statSync("package-lock.json").mtimeMs) return;
  log("installing npm packages (npm ci)");
  run("npm", ["ci", "--no-audit", "--no-fund"]);
}

const children = new Set();
function spawnChild(cmd, args, env) {
  const child = spawn(cmd, args, { stdio: "inherit", env: { ...process.env, ...env } });
  children.add(child);
  child.on("exit", () => children.delete(child));
  return child;
}
/** SIGTERM to every child, SIGKILL to any still running after 5 s; resolves when all have exited. */
async function stopChildren() {
  const running = [...children].filter((c) => c.exitCode === null && c.signalCode === null);
  await Promise.all(running.map((child) => new Promise((resolve) => {
    const timer = setTimeout(() => child.kill("SIGKILL"), 5000);
    child.once("exit", () => { clearTimeout(timer); resolve(); });
    child.kill("SIGTERM");
  })));
}

/** A child that already printed its one-line reason (exit code 2); nothing more to say. */
class ReportedError extends Error {}

const tsx = path.join(ROOT, "node_modules/tsx/dist/cli.mjs");
const localDir = path.join(ROOT, ".blindcut");
const ci = process.env.CI === "true" || process.env.CI === "1";
// What this run started, so a failure at any step stops exactly that and no more.
const owned = { postgres: false, createdCluster: false, joined: false };
const summaryFile = path.join(localDir, `test-summary-${process.pid}.txt`);

let cleaning = null;
function cleanup() {
  cleaning ??= (async () => {
    await stopChildren();
    if (!owned.joined) return;
    owned.joined = false;
    // Another command of this checkout (a second `npm start`, or `npm test`) may still use the cluster.
    const { stop, others } = leaveCluster();
    if (others.length > 0) {
      if (owned.postgres) log(`PostgreSQL keeps running for the other command(s) of this checkout using it (pid ${others.join(", ")}); the last one stops it`);
      return;
    }
    if (!stop || process.env.BLINDCUT_KEEP_DB) return;
    if (command === "test" && ci && owned.createdCluster) {
      removeCluster();
      log(`removed this throw-away checkout's test cluster (${dataDir}; CI=true)`);
      // CI reads the count as the last line.
      if (existsSync(summaryFile)) console.log(readFileSync(summaryFile, "utf8").trim());
      return;
    }
    stopPostgres();
    if (command !== "test") log("PostgreSQL stopped");
  })();
  return cleaning;
}
const exitAfterCleanup = (code) => cleanup().finally(() => {
  rmSync(summaryFile, { force: true });
  process.exit(code);
});

/** Ports that must be free before anything starts: PostgreSQL's (unless this checkout's cluster holds it) and the app's. */
async function preflight() {
  const problems = [];
  const pg = await postgresPortProblem();
  if (pg) problems.push(pg);
  if (command === "start" || command === "dev") {
    const port = Number(process.env.PORT ?? 3000);
    const host = process.env.HOST ?? "0.0.0.0";
    if (!(await portFree(port, host))) problems.push(portTakenMessage({ service: "The app", port, host, variable: "PORT" }));
  }
  if (problems.length) throw new UserFixableError(problems.join("\n[blindcut] "));
}

/** Offers, in one line, to remove cluster folders of checkouts that no longer exist. */
function offerPrune() {
  const orphans = orphanClusters();
  if (orphans.length === 0) return;
  const mb = Math.round(orphans.reduce((sum, o) => sum + o.bytes, 0) / 1e6);
  log(`${orphans.length} PostgreSQL data folder(s) under ${path.dirname(dataDir)} belong to checkouts that no longer exist (${mb} MB); \`npm run db:prune\` removes them.`);
}

async function main() {
  if (command === "db:stop") {
    log(stopPostgres() ? "PostgreSQL stopped" : "PostgreSQL was not running");
    return;
  }
  if (command === "db:prune") {
    const removed = pruneOrphanClusters();
    for (const o of removed) log(`removed ${o.dir} (its checkout ${o.checkout} no longer exists)`);
    log(removed.length ? `${removed.length} folder(s) removed` : "no data folders of vanished checkouts");
    return;
  }
  ensureDebianPackages(command === "test" ? [postgresql, chromium, poppler] : [postgresql]);
  ensureNodeModules();
  process.on("SIGINT", () => exitAfterCleanup(130));
  process.on("SIGTERM", () => exitAfterCleanup(143));
  await preflight();
  if (command !== "test" || !ci) offerPrune();
  const fast = command === "test";
  const { started, created } = await startPostgres({ fast });
  owned.postgres = started && command !== "db:start";
  owned.createdCluster = created;
  if (command !== "db:start") {
    joinCluster({ starter: owned.postgres });
    owned.joined = true;
  }
  log(`PostgreSQL ${started ? "started" : "already running"} on 127.0.0.1:${pgPort}`);
  if (command === "db:start") {
    if (started) keepRunning();
    return;
  }

  mkdirSync(localDir, { recursive: true });

  if (command === "test") {
    rmSync(summaryFile, { force: true });
    const runner = spawnChild(process.execPath, [tsx, "scripts/run-tests.ts", `--summary-file=${summaryFile}`, ...process.argv.slice(3)]);
    const code = await new Promise((resolve) => runner.once("exit", (c) => resolve(c ?? 1)));
    await exitAfterCleanup(code);
    return;
  }

  // start and dev: the app's database, migrations, demo data, local fakes, then the app.
  ensureDatabase("blindcut");
  const env = {
    DATABASE_URL: process.env.DATABASE_URL ?? databaseUrl("blindcut"),
    BLINDCUT_LOCAL_DIR: localDir,
  };
  Object.assign(process.env, env);
  rmSync(path.join(localDir, "services.json"), { force: true });
  const fakes = spawnChild(process.execPath, [tsx, "scripts/local-services.ts"], env);
  await waitForFile(path.join(localDir, "services.json"), fakes);
  fakes.on("exit", (code) => {
    if (cleaning) return;
    log(`the local fakes exited (${code})`);
    exitAfterCleanup(1);
  });
  const services = JSON.parse(readFileSync(path.join(localDir, "services.json"), "utf8"));
  Object.assign(env, services.env);
  run(process.execPath, [tsx, "scripts/migrate.ts"], { env: { ...process.env, ...env } });
  if (process.env.BLINDCUT_DEMO !== "0") run(process.execPath, [tsx, "scripts/demo-data.ts"], { env: { ...process.env, ...env } });

  if (command === "dev") {
    spawnChild(process.execPath, ["node_modules/@react-router/dev/bin.js", "dev", "--port", process.env.PORT ?? "3000"], { ...env, BLINDCUT_DEMO_ACCOUNTS: process.env.BLINDCUT_DEMO === "0" ? "0" : "1" });
  } else {
    if (buildIsStale()) run(process.execPath, ["node_modules/@react-router/dev/bin.js", "build"]);
    else log("build is up to date");
    const app = spawnChild(process.execPath, ["scripts/server.mjs"], { ...env, NODE_ENV: "production", BLINDCUT_INSECURE_COOKIES: "1", BLINDCUT_DEMO_ACCOUNTS: process.env.BLINDCUT_DEMO === "0" ? "0" : "1", BLINDCUT_DEV_MAIL: "1", SESSION_SECRET: process.env.SESSION_SECRET ?? localSecret() });
    app.on("exit", (code) => {
      if (cleaning) return;
      if (code !== 2) log(`app exited (${code})`);
      exitAfterCleanup(code === 0 ? 0 : 1);
    });
    await announce(Number(process.env.PORT ?? 3000), app);
  }
}

async function announce(port, app) {
  for (let i = 0; i < 200; i++) {
    if (app.exitCode !== null) return;
    try {
      if ((await fetch(`http://127.0.0.1:${port}/healthz`)).ok) break;
    } catch {}
    await new Promise((r) => setTimeout(r, 100));
  }
  const lines = [
    "",
    `Blindcut is ready: open http://localhost:${port}`,
    process.env.BLINDCUT_DEMO === "0" ? "No demo data loaded." : "Demo lab (invented): sign in as owner@demo.test, lead@demo.test, tester@demo.test, tester2@demo.test or analyst@demo.test, password blindcut-demo.",
    `Caught e-mail: http://localhost:${port}/dev/mail`,
    owned.postgres ? "Press Ctrl-C to stop the app, the local fakes and PostgreSQL." : "Press Ctrl-C to stop the app and the local fakes (PostgreSQL was already running).",
    "",
  ];
  console.log(lines.join("\n"));
}

/** Whether any source file is newer than the last production build (a second start skips the build). */
function buildIsStale() {
  const built = path.join(ROOT, "build/server/index.js");
  if (!existsSync(built)) return true;
  const builtAt = statSync(built).mtimeMs;
  const newer = (p) => {
    const st = statSync(p);
    if (st.isDirectory()) return readdirSync(p).some((name) => newer(path.join(p, name)));
    return st.mtimeMs > builtAt;
  };
  return ["app", "public", "vite.config.ts", "react-router.config.ts", "package-lock.json"].some((p) => existsSync(p) && newer(p));
}

// A secret kept in the local folder, so local sessions survive a restart.
function localSecret() {
  const file = path.join(localDir, "session-secret");
  if (!existsSync(file)) writeFileSync(file, [...crypto.getRandomValues(new Uint8Array(32))].map((b) => b.toString(16).padStart(2, "0")).join(""), { mode: 0o600 });
  return readFileSync(file, "utf8").trim();
}

async function waitForFile(file, child) {
  for (let i = 0; i < 300; i++) {
    if (existsSync(file)) return;
    if (child.exitCode === 2) throw new ReportedError();
    if (child.exitCode !== null) throw new Error(`the local fakes exited (${child.exitCode}) during start-up`);
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("local services did not start in 30 s");
}

main().catch((err) => {
  // A condition the user can fix gets its line alone; anything else its message (no stack either way).
  if (!(err instanceof ReportedError)) console.error(`[blindcut] ${err.message}`);
  exitAfterCleanup(1);
});
