// Entry point of `npm start`, `npm test`, `npm run dev`, `npm run db:start|db:stop`.
// Node built-ins only until the npm packages are installed: it installs what is
// missing (Debian and npm packages), starts PostgreSQL and the local fakes, then
// hands over to the TypeScript scripts.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, statSync, mkdirSync, writeFileSync, readFileSync, rmSync, readdirSync } from "node:fs";
import path from "node:path";
import { startPostgres, stopPostgres, ensureDatabase, databaseUrl, postgresInstalled, pgPort } from "./postgres.mjs";

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
function stopChildren() {
  for (const child of children) child.kill("SIGTERM");
}

const tsx = path.join(ROOT, "node_modules/tsx/dist/cli.mjs");
const localDir = path.join(ROOT, ".blindcut");

async function main() {
  if (command === "db:stop") {
    log(stopPostgres() ? "PostgreSQL stopped" : "PostgreSQL was not running");
    return;
  }
  ensureDebianPackages(command === "test" ? [postgresql, chromium, poppler] : [postgresql]);
  ensureNodeModules();
  const fast = command === "test";
  const { started } = await startPostgres({ fast });
  log(`PostgreSQL ${started ? "started" : "already running"} on 127.0.0.1:${pgPort}`);
  if (command === "db:start") return;

  mkdirSync(localDir, { recursive: true });
  let ownsPostgres = started;
  const cleanup = () => {
    stopChildren();
    if (ownsPostgres && !process.env.BLINDCUT_KEEP_DB) {
      ownsPostgres = false;
      stopPostgres();
      if (command !== "test") log("PostgreSQL stopped");
    }
  };
  process.on("SIGINT", () => { cleanup(); process.exit(130); });
  process.on("SIGTERM", () => { cleanup(); process.exit(143); });

  if (command === "test") {
    const code = spawnSync(process.execPath, [tsx, "scripts/run-tests.ts"], { stdio: "inherit" }).status ?? 1;
    cleanup();
    process.exit(code);
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
    app.on("exit", (code) => { log(`app exited (${code})`); cleanup(); process.exit(code ?? 1); });
    await announce(Number(process.env.PORT ?? 3000));
  }
}

async function announce(port) {
  for (let i = 0; i < 200; i++) {
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
    "Press Ctrl-C to stop the app, the local fakes and PostgreSQL.",
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
    if (child.exitCode !== null) throw new Error("local services failed to start");
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("local services did not start in 30 s");
}

main().catch((err) => {
  console.error(`[blindcut] ${err.message}`);
  stopChildren();
  process.exit(1);
});
