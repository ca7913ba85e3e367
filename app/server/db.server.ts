import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "./db/schema/index.ts";
import { env } from "./env.server.ts";

export type Database = NodePgDatabase<typeof schema>;
export type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];
export type DbOrTx = Database | Transaction;

let pool: pg.Pool | undefined;
let database: Database | undefined;

/** The shared connection pool, created on first use (never at import, so builds and tests can set the URL first). */
export function getPool(): pg.Pool {
  if (!pool) {
    pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 5_000 });
    // An idle client that loses its server must not crash the process; the next query reconnects.
    pool.on("error", () => {});
  }
  return pool;
}

export function db(): Database {
  database ??= drizzle(getPool(), { schema });
  return database;
}

export async function closeDb() {
  const p = pool;
  pool = undefined;
  database = undefined;
  await p?.end();
}

export { schema };
