// The floor for saving a reading: a plain single-row INSERT on the same PostgreSQL, with
// pgbench (a one-line custom script, one transaction per INSERT), its per-transaction
// latencies read from its own log (--log).
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { withClient } from "./services.ts";
import { percentile } from "./stats.ts";

export const PGBENCH = `${process.env.BLINDCUT_PG_BIN ?? "/usr/lib/postgresql/15/bin"}/pgbench`;
export const INSERT_SCRIPT = "INSERT INTO bench_plain_insert (client, value) VALUES (:client_id, random() * 400);";

export type PgbenchRun = { tps: number; p50: number; p95: number; transactions: number; args: string[] };

export async function createInsertTable(databaseUrl: string) {
  await withClient(databaseUrl, (c) => c.query("CREATE TABLE IF NOT EXISTS bench_plain_insert (id bigserial PRIMARY KEY, client integer NOT NULL, value double precision NOT NULL, at timestamptz NOT NULL DEFAULT now())"));
}

/** The arguments of one pgbench run, for the report as well. */
export function pgbenchArgs(options: { port: number; database: string; clients: number; seconds: number; script: string; logPrefix: string }) {
  return ["-h", "127.0.0.1", "-p", String(options.port), "-U", "postgres", "-n", "-c", String(options.clients), "-j", "2", "-T", String(options.seconds), "-f", options.script, "--log", `--log-prefix=${options.logPrefix}`, options.database];
}

export function runPgbench(options: { port: number; database: string; clients: number; seconds: number }): PgbenchRun {
  const dir = mkdtempSync(path.join(os.tmpdir(), "blindcut-pgbench-"));
  try {
    const script = path.join(dir, "insert.sql");
    writeFileSync(script, `${INSERT_SCRIPT}\n`);
    const args = pgbenchArgs({ ...options, script, logPrefix: path.join(dir, "tx") });
    const result = spawnSync(PGBENCH, args, { encoding: "utf8", timeout: (options.seconds + 60) * 1000 });
    if (result.status !== 0) throw new Error(`pgbench failed (${result.status}): ${result.stderr}`);
    const tps = Number(/tps = ([\d.]+)/.exec(result.stdout)?.[1] ?? Number.NaN);
    // Per-transaction log lines: client_id transaction_no time_us script_no time_epoch time_us_of_epoch
    const latenciesMs: number[] = [];
    for (const file of readdirSync(dir).filter((f) => f.startsWith("tx"))) {
      for (const line of readFileSync(path.join(dir, file), "utf8").split("\n")) {
        const fields = line.trim().split(/\s+/);
        if (fields.length >= 3) latenciesMs.push(Number(fields[2]) / 1000);
      }
    }
    return { tps, p50: percentile(latenciesMs, 50), p95: percentile(latenciesMs, 95), transactions: latenciesMs.length, args: args.map((a) => (a.startsWith(dir) || a.includes(dir) ? a.replace(dir, "$TMP") : a)) };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
