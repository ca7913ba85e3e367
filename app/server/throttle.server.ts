import { and, eq, gt, sql } from "drizzle-orm";
import { db } from "./db.server.ts";
import { resetRequests, signInFailures } from "./db/schema/index.ts";

/** Failed sign-ins per account in the window before the account pauses (a password reset lifts it). */
export const MAX_FAILURES = 5;
/** Failed sign-ins per client address in the window, whatever the accounts tried. */
export const MAX_CLIENT_FAILURES = 20;
export const WINDOW_MINUTES = 15;
/** Reset requests per address and per client in the window. */
export const MAX_RESETS_PER_ADDRESS = 3;
export const MAX_RESETS_PER_CLIENT = 10;

export type SignInGate = { ok: true; attemptId: string } | { ok: false; minutes: number; scope: "account" | "client" };

const minutesLeft = (oldest: Date) => Math.max(1, Math.ceil((oldest.getTime() + WINDOW_MINUTES * 60_000 - Date.now()) / 60_000));

/**
 * Checks and records one sign-in attempt atomically: under a transaction lock per
 * account and per client, the recent attempts are counted and, when under both limits,
 * this attempt is recorded as a failure before the password is checked. Concurrent
 * guesses therefore see each other; a correct password removes the row afterwards.
 */
export async function beginSignInAttempt(email: string, clientAddress: string): Promise<SignInGate> {
  const account = email.toLowerCase();
  return db().transaction(async (tx) => {
    // Fixed order (account, then client) so two attempts never wait on each other in a cycle.
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${`sign-in account:${account}`}))`);
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${`sign-in client:${clientAddress}`}))`);
    const since = new Date(Date.now() - WINDOW_MINUTES * 60_000);
    const [counts] = (
      await tx.execute<{ by_account: number; by_client: number; oldest_account: Date | null; oldest_client: Date | null }>(sql`
        SELECT count(*) FILTER (WHERE email = ${account})::int AS by_account,
               count(*) FILTER (WHERE client_address = ${clientAddress})::int AS by_client,
               (SELECT at FROM sign_in_failures WHERE email = ${account} AND at > ${since} ORDER BY at DESC OFFSET ${MAX_FAILURES - 1} LIMIT 1) AS oldest_account,
               (SELECT at FROM sign_in_failures WHERE client_address = ${clientAddress} AND at > ${since} ORDER BY at DESC OFFSET ${MAX_CLIENT_FAILURES - 1} LIMIT 1) AS oldest_client
        FROM sign_in_failures
        WHERE at > ${since} AND (email = ${account} OR client_address = ${clientAddress})`)
    ).rows;
    if (counts.by_account >= MAX_FAILURES) return { ok: false as const, scope: "account" as const, minutes: minutesLeft(new Date(counts.oldest_account!)) };
    if (counts.by_client >= MAX_CLIENT_FAILURES) return { ok: false as const, scope: "client" as const, minutes: minutesLeft(new Date(counts.oldest_client!)) };
    const [row] = await tx.insert(signInFailures).values({ email: account, clientAddress }).returning({ id: signInFailures.id });
    return { ok: true as const, attemptId: row.id };
  });
}

/** A correct password: the account's failures end (the client's own count stays). */
export async function signInSucceeded(email: string) {
  await clearSignInFailures(email);
}

export async function clearSignInFailures(email: string) {
  await db().delete(signInFailures).where(eq(signInFailures.email, email.toLowerCase()));
}

/**
 * Counts and records a reset request in one locked transaction: false when the address
 * or the client has asked too often in the window (the answer stays the same either way).
 */
export async function allowResetRequest(email: string, clientAddress: string): Promise<boolean> {
  const address = email.toLowerCase();
  return db().transaction(async (tx) => {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${`reset address:${address}`}))`);
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${`reset client:${clientAddress}`}))`);
    const since = new Date(Date.now() - WINDOW_MINUTES * 60_000);
    const [{ byAddress }] = await tx.select({ byAddress: sql<number>`count(*)::int` }).from(resetRequests).where(and(eq(resetRequests.email, address), gt(resetRequests.at, since)));
    const [{ byClient }] = await tx.select({ byClient: sql<number>`count(*)::int` }).from(resetRequests).where(and(eq(resetRequests.clientAddress, clientAddress), gt(resetRequests.at, since)));
    if (byAddress >= MAX_RESETS_PER_ADDRESS || byClient >= MAX_RESETS_PER_CLIENT) return false;
    await tx.insert(resetRequests).values({ email: address, clientAddress });
    return true;
  });
}
