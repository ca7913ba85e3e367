// The project's own PostgreSQL cluster on loopback: created on first use, started
// as the `postgres` system user (PostgreSQL refuses to run as root), idempotent.
// Node built-ins only: this runs before `npm ci` has ever run.
import { execFileSync, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, rmSync, readFileSync, writeFileSync, readdirSync, statSync, chownSync } from "node:fs";
import path from "node:path";
import { portFree, portTakenMessage, UserFixableError } from "./ports.mjs";

const BIN = process.env.BLINDCUT_PG_BIN ?? "/usr/lib/postgresql/15/bin";
const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");

export const pgPort = Number(process.env.BLINDCUT_PG_PORT ?? 54329);
// One cluster per checkout: a developer's tree and CI's clone never share data.
const checkoutTag = createHash("sha256").update(ROOT).digest("hex").slice(0, 10);
export const dataDir = process.env.BLINDCUT_PG_DATA ?? `/var/lib/blindcut/pg-${checkoutTag}-${pgPort}`;
const socketDir = `${dataDir}-sock`;
const logFile = `${dataDir}.log`;
// Beside each cluster: which checkout made it, so folders of checkouts that are gone can be found.
const markerFile = `${dataDir}.checkout`;

const isRoot = process.getuid?.() === 0;

function asPostgres(cmd, args, opts = {}) {
  const full = path.join(BIN, cmd);
  if (isRoot) return spawnSync("runuser", ["-u", "postgres", "--", full, ...args], { encoding: "utf8", ...opts });
  return spawnSync(full, args, { encoding: "utf8", ...opts });
}

export function postgresInstalled() {
  return existsSync(path.join(BIN, "initdb"));
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

/** The one line for a taken PostgreSQL port, or null when the port is free (or this cluster holds it). */
export async function postgresPortProblem() {
  if (isRunning()) return null;
  if (await portFree(pgPort, "127.0.0.1")) return null;
  return portTakenMessage({ service: "PostgreSQL", port: pgPort, host: "127.0.0.1", variable: "BLINDCUT_PG_PORT", dataDir });
}

/**
 * Starts the cluster. `created` says whether this call made the data folder, so a
 * throw-away checkout's test run can remove exactly what it made.
 */
export async function startPostgres({ fast = false } = {}) {
  if (!postgresInstalled()) throw new Error(`PostgreSQL binaries not found in ${BIN}`);
  let created = false;
  if (isRunning()) {
    writeMarker();
    return { started: false, created };
  }
  // Checked before initdb, so a taken port leaves no new folder behind.
  const problem = await postgresPortProblem();
  if (problem) throw new UserFixableError(problem);
  if (!existsSync(path.join(dataDir, "PG_VERSION"))) {
    created = true;
    mkdirSync(path.dirname(dataDir), { recursive: true });
    rmSync(dataDir, { recursive: true, force: true });
    mkdirSync(dataDir, { recursive: true, mode: 0o700 });
    ownedByPostgres(dataDir);
    const init = asPostgres("initdb", ["-D", dataDir, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--locale=C.UTF-8"]);
    if (init.status !== 0) throw new Error(`initdb failed:\n${init.stderr}`);
  }
  writeMarker();
  mkdirSync(socketDir, { recursive: true });
  ownedByPostgres(socketDir);
  // A crash can leave postmaster.pid behind; pg_ctl status said no server, so it is stale.
  const pidFile = path.join(dataDir, "postmaster.pid");
  if (existsSync(pidFile)) rmSync(pidFile);
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
    if (asPostgres("pg_isready", ["-h", "127.0.0.1", "-p", String(pgPort)]).status === 0) return { started: true, created };
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("PostgreSQL started but does not accept connections");
}

export function stopPostgres() {
  if (!isRunning()) return false;
  asPostgres("pg_ctl", ["-D", dataDir, "-m", "fast", "-w", "stop"]);
  return true;
}

// Commands of this checkout using the cluster (start, dev, test), one file per pid, so
// the last one to end stops a cluster that a command started, even if it was not the starter.
const usersDir = `${dataDir}.users`;
const stopFlag = path.join(usersDir, "stop-when-last");

/** Records this process as a user of the cluster; `starter` when it started the cluster itself. */
export function joinCluster({ starter }) {
  mkdirSync(usersDir, { recursive: true });
  writeFileSync(path.join(usersDir, String(process.pid)), "");
  if (starter) writeFileSync(stopFlag, "");
}

/** A cluster started by `npm run db:start` stays up until `npm run db:stop`, whoever uses it meanwhile. */
export function keepRunning() {
  rmSync(stopFlag, { force: true });
}

/** Removes this process's record; pids of other live users remain. Returns whether the cluster should stop now. */
export function leaveCluster() {
  rmSync(path.join(usersDir, String(process.pid)), { force: true });
  let others = [];
  try {
    others = readdirSync(usersDir).filter((n) => /^\d+$/.test(n)).map(Number);
  } catch {}
  const alive = others.filter((pid) => pidAlive(pid));
  for (const pid of others) if (!alive.includes(pid)) rmSync(path.join(usersDir, String(pid)), { force: true });
  const stop = alive.length === 0 && existsSync(stopFlag);
  if (stop) rmSync(usersDir, { recursive: true, force: true });
  return { stop, others: alive };
}

/** Stops the cluster and deletes its data, socket folder, log and marker (a throw-away checkout's test cluster). */
export function removeCluster() {
  stopPostgres();
  for (const p of [dataDir, socketDir, logFile, markerFile, usersDir]) rmSync(p, { recursive: true, force: true });
}

function writeMarker() {
  try {
    writeFileSync(markerFile, JSON.stringify({ checkout: ROOT, port: pgPort }) + "\n");
  } catch {}
}

function pidAlive(pid) {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return err.code === "EPERM";
  }
}

function folderBytes(p) {
  let total = 0;
  try {
    const st = statSync(p);
    if (!st.isDirectory()) return st.size;
    for (const name of readdirSync(p)) total += folderBytes(path.join(p, name));
  } catch {}
  return total;
}

/**
 * Cluster folders beside this one whose checkout no longer exists and whose server is
 * not running. Only folders with a marker are considered: the data of a checkout that
 * still exists, or of one that cannot be told, is never listed.
 */
export function orphanClusters(root = path.dirname(dataDir)) {
  const found = [];
  let names = [];
  try {
    names = readdirSync(root);
  } catch {
    return found;
  }
  for (const name of names) {
    if (!name.endsWith(".checkout")) continue;
    const marker = path.join(root, name);
    // The folder is the marker's sibling by name, never a path read from the file.
    const dir = marker.slice(0, -".checkout".length);
    let checkout;
    try {
      checkout = JSON.parse(readFileSync(marker, "utf8")).checkout;
    } catch {
      continue;
    }
    if (typeof checkout !== "string" || !path.isAbsolute(checkout) || existsSync(checkout)) continue;
    const pidFile = path.join(dir, "postmaster.pid");
    if (existsSync(pidFile)) {
      const pid = Number(readFileSync(pidFile, "utf8").split("\n")[0]);
      if (pid && pidAlive(pid)) continue;
    }
    found.push({ dir, checkout, bytes: folderBytes(dir) });
  }
  return found;
}

/** Removes the folders `orphanClusters` lists; returns them. */
export function pruneOrphanClusters(root) {
  const orphans = orphanClusters(root);
  for (const { dir } of orphans) {
    for (const p of [dir, `${dir}-sock`, `${dir}.log`, `${dir}.checkout`, `${dir}.users`]) rmSync(p, { recursive: true, force: true });
  }
  return orphans;
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
