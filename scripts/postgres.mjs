// The project's own PostgreSQL cluster on loopback: created on first use, started
// as the `postgres` system user (PostgreSQL refuses to run as root), idempotent.
// Node built-ins only: this runs before `npm ci` has ever run.
import { execFileSync, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, rmSync, readFileSync, chownSync } from "node:fs";
import net from "node:net";
import path from "node:path";

const BIN = process.env.BLINDCUT_PG_BIN ?? "/usr/lib/postgresql/15/bin";
const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");

export const pgPort = Number(process.env.BLINDCUT_PG_PORT ?? 54329);
// One cluster per checkout: a developer's tree and CI's clone never share data.
const checkoutTag = createHash("sha256").update(ROOT).digest("hex").slice(0, 10);
export const dataDir = process.env.BLINDCUT_PG_DATA ?? `/var/lib/blindcut/pg-${checkoutTag}-${pgPort}`;
const socketDir = `${dataDir}-sock`;
const logFile = `${dataDir}.log`;

const isRoot = process.getuid?.() === 0;

function asPostgres(cmd, args, opts = {}) {
  const full = path.join(BIN, cmd);
  if (isRoot) return spawnSync("runuser", ["-u", "postgres", "--", full, ...args], { encoding: "utf8", ...opts });
  return spawnSync(full, args, { encoding: "utf8", ...opts });
}

export function postgresInstalled() {
  return existsSync(path.join(BIN, "initdb"));
}

function portTaken(port) {
  return new Promise((resolve) => {
    const socket = net.connect({ host: "127.0.0.1", port });
    socket.once("connect", () => { socket.destroy(); resolve(true); });
    socket.once("error", () => resolve(false));
  });
}

function ownedByPostgres(dir) {
  if (!isRoot) return;
  const uid = Number(execFileSync("id", ["-u", "postgres"], { encoding: "utf8" }).trim());
  const gid = Number(execFileSync("id", ["-g", "postgres"], { encoding: "utf8" }).trim());
  chownSync(dir, uid, gid);
}

export function isRunning() {
  if (!existsSync(path.join(dataDir, "PG_VERSION"))) return false;
  return asPostgres("pg_ctl", ["status", "-D", dataDir]).status === 0;
}

export async function startPostgres({ fast = false } = {}) {
  if (!postgresInstalled()) throw new Error(`PostgreSQL binaries not found in ${BIN}`);
  if (!existsSync(path.join(dataDir, "PG_VERSION"))) {
    mkdirSync(path.dirname(dataDir), { recursive: true });
    rmSync(dataDir, { recursive: true, force: true });
    mkdirSync(dataDir, { recursive: true, mode: 0o700 });
    ownedByPostgres(dataDir);
    const init = asPostgres("initdb", ["-D", dataDir, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--locale=C.UTF-8"]);
    if (init.status !== 0) throw new Error(`initdb failed:\n${init.stderr}`);
  }
  mkdirSync(socketDir, { recursive: true });
  ownedByPostgres(socketDir);
  if (isRunning()) return { started: false };
  // A crash can leave postmaster.pid behind; pg_ctl status said no server, so it is stale.
  const pidFile = path.join(dataDir, "postmaster.pid");
  if (existsSync(pidFile)) rmSync(pidFile);
  if (await portTaken(pgPort)) {
    throw new Error(
      `Port ${pgPort} on 127.0.0.1 is taken by another program. Stop it, or choose another port with BLINDCUT_PG_PORT=...`,
    );
  }
  const options = [`-p ${pgPort}`, "-c listen_addresses=127.0.0.1", `-k ${socketDir}`, "-c max_connections=200"];
  // Only test clusters may trade durability for speed.
  if (fast) options.push("-c fsync=off", "-c synchronous_commit=off", "-c full_page_writes=off");
  if (isRoot) execFileSync("touch", [logFile]), ownedByPostgres(logFile);
  const start = asPostgres("pg_ctl", ["-D", dataDir, "-l", logFile, "-w", "-t", "60", "-o", options.join(" "), "start"]);
  if (start.status !== 0) {
    const log = existsSync(logFile) ? readFileSync(logFile, "utf8").split("\n").slice(-15).join("\n") : "";
    throw new Error(`PostgreSQL did not start:\n${start.stderr}\n${log}`);
  }
  for (let i = 0; i < 100; i++) {
    if (asPostgres("pg_isready", ["-h", "127.0.0.1", "-p", String(pgPort)]).status === 0) return { started: true };
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("PostgreSQL started but does not accept connections");
}

export function stopPostgres() {
  if (!isRunning()) return false;
  asPostgres("pg_ctl", ["-D", dataDir, "-m", "fast", "-w", "stop"]);
  return true;
}

export function databaseUrl(name) {
  return `postgres://postgres@127.0.0.1:${pgPort}/${name}`;
}

export function ensureDatabase(name) {
  const exists = asPostgres("psql", ["-h", "127.0.0.1", "-p", String(pgPort), "-U", "postgres", "-tAc", `SELECT 1 FROM pg_database WHERE datname='${name}'`]);
  if (exists.stdout.trim() === "1") return false;
  const created = asPostgres("createdb", ["-h", "127.0.0.1", "-p", String(pgPort), "-U", "postgres", name]);
  if (created.status !== 0) throw new Error(`createdb ${name} failed: ${created.stderr}`);
  return true;
}
