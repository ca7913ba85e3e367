import { sql } from "drizzle-orm";
import { db } from "./db.server.ts";

export async function checkDatabase(): Promise<{ ok: true; latencyMs: number } | { ok: false; error: string }> {
  const started = performance.now();
  try {
    await Promise.race([
      db().execute(sql`SELECT 1`),
      new Promise((_, reject) => setTimeout(() => reject(new Error("timeout after 2 s")), 2_000)),
    ]);
    return { ok: true, latencyMs: Math.round(performance.now() - started) };
  } catch (error) {
    return { ok: false, error: error instanceof Error ? error.message : "unknown error" };
  }
}
