import { createCookie, redirect } from "react-router";
import { and, eq, gt, ne } from "drizzle-orm";
import { db, type DbOrTx } from "./db.server.ts";
import { sessions, users, type User } from "./db/schema/index.ts";
import { env, sessionSecret } from "./env.server.ts";
import { randomToken, tokenHash } from "./tokens.server.ts";

const SESSION_DAYS = 30;

function sessionCookie() {
  const e = env();
  return createCookie("blindcut_session", {
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    secure: e.NODE_ENV === "production" && !e.BLINDCUT_INSECURE_COOKIES,
    secrets: [sessionSecret()],
    maxAge: SESSION_DAYS * 24 * 3600,
  });
}

/** Starts a new session (a fresh id at every sign-in) and returns its Set-Cookie header. */
export async function createUserSession(userId: string, tx: DbOrTx = db()): Promise<string> {
  const id = randomToken();
  await tx.insert(sessions).values({
    id: tokenHash(id),
    userId,
    expiresAt: new Date(Date.now() + SESSION_DAYS * 24 * 3600 * 1000),
  });
  return sessionCookie().serialize(id);
}

async function readSessionId(request: Request): Promise<string | null> {
  const value = await sessionCookie().parse(request.headers.get("Cookie"));
  return typeof value === "string" && value.length > 0 ? value : null;
}

export type SessionUser = Pick<User, "id" | "email" | "name"> & { sessionId: string };

// The root loader and the route's own loader both ask for the user of one request:
// look it up once per request object (never across requests, so a sign-out still takes effect at once).
const perRequest = new WeakMap<Request, Promise<SessionUser | null>>();

/** The signed-in user, checked against the sessions table on every request. */
export function getSessionUser(request: Request): Promise<SessionUser | null> {
  let found = perRequest.get(request);
  if (!found) {
    found = lookUpSessionUser(request);
    perRequest.set(request, found);
  }
  return found;
}

async function lookUpSessionUser(request: Request): Promise<SessionUser | null> {
  const id = await readSessionId(request);
  if (!id) return null;
  const [row] = await db()
    .select({ id: users.id, email: users.email, name: users.name, sessionId: sessions.id })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(and(eq(sessions.id, tokenHash(id)), gt(sessions.expiresAt, new Date())))
    .limit(1);
  return row ?? null;
}

/** Ends the session server-side, so the old cookie stops working everywhere. */
export async function signOut(request: Request, redirectTo = "/") {
  const id = await readSessionId(request);
  if (id) await db().delete(sessions).where(eq(sessions.id, tokenHash(id)));
  throw redirect(redirectTo, { headers: { "Set-Cookie": await sessionCookie().serialize("", { maxAge: 0 }) } });
}

/** After a password change: every other session of the user ends. */
export async function endOtherSessions(tx: DbOrTx, userId: string, keepSessionId: string | null) {
  await tx
    .delete(sessions)
    .where(keepSessionId ? and(eq(sessions.userId, userId), ne(sessions.id, keepSessionId)) : eq(sessions.userId, userId));
}
