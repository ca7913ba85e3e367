import { and, eq, gt, sql } from "drizzle-orm";
import { db } from "./db.server.ts";
import { signInFailures } from "./db/schema/index.ts";

export const MAX_FAILURES = 5;
export const WINDOW_MINUTES = 15;

/** Minutes until another sign-in attempt is allowed for this e-mail, or 0 when allowed now. */
export async function signInLockMinutes(email: string): Promise<number> {
  const since = new Date(Date.now() - WINDOW_MINUTES * 60_000);
  const rows = await db()
    .select({ at: signInFailures.at })
    .from(signInFailures)
    .where(and(eq(signInFailures.email, email.toLowerCase()), gt(signInFailures.at, since)))
    .orderBy(sql`${signInFailures.at} desc`)
    .limit(MAX_FAILURES);
  if (rows.length < MAX_FAILURES) return 0;
  // Locked until the oldest of the last five failures leaves the window.
  const oldest = rows[rows.length - 1].at.getTime();
  return Math.max(1, Math.ceil((oldest + WINDOW_MINUTES * 60_000 - Date.now()) / 60_000));
}

export async function recordSignInFailure(email: string) {
  await db().insert(signInFailures).values({ email: email.toLowerCase() });
}

export async function clearSignInFailures(email: string) {
  await db().delete(signInFailures).where(eq(signInFailures.email, email.toLowerCase()));
}
