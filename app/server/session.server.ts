import { createCookie, redirect } from "react-router";
import { and, asc, eq, gt, ne } from "drizzle-orm";
import { db, type DbOrTx } from "./db.server.ts";
import { labs, memberships, sessions, users, type Lab, type Membership, type User } from "./db/schema/index.ts";
import { oncePerRequest } from "./request-scope.server.ts";
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

/** One lab the signed-in user belongs to, with the role as the database holds it now. */
export type SessionMembership = { labId: Lab["id"]; labName: Lab["name"]; isDemo: Lab["isDemo"]; timeZone: Lab["timeZone"]; role: Membership["role"] };

export type SignedIn = { user: SessionUser; memberships: SessionMembership[] };

/** The signed-in user, checked against the sessions table on every request. */
export async function getSessionUser(request: Request): Promise<SessionUser | null> {
  return (await getSignedIn(request))?.user ?? null;
}

/**
 * The session, its user and every membership of that user (with the lab), in one statement.
 * A read request (every loader of one page) asks the database once; the next request asks
 * again, so a sign-out or a changed role takes effect at once.
 */
export async function getSignedIn(request: Request): Promise<SignedIn | null> {
  const id = await readSessionId(request);
  if (!id) return null;
  const hash = tokenHash(id);
  return oncePerRequest(`signed-in:${hash}`, () => lookUpSignedIn(hash));
}

async function lookUpSignedIn(sessionHash: string): Promise<SignedIn | null> {
  const rows = await db()
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      sessionId: sessions.id,
      labId: labs.id,
      labName: labs.name,
      isDemo: labs.isDemo,
      timeZone: labs.timeZone,
      role: memberships.role,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(labs, eq(labs.id, memberships.labId))
    .where(and(eq(sessions.id, sessionHash), gt(sessions.expiresAt, new Date())))
    .orderBy(asc(labs.name));
  const [first] = rows;
  if (!first) return null;
  const memberships_: SessionMembership[] = [];
  for (const r of rows) {
    if (r.labId !== null && r.labName !== null && r.isDemo !== null && r.timeZone !== null && r.role !== null) {
      memberships_.push({ labId: r.labId, labName: r.labName, isDemo: r.isDemo, timeZone: r.timeZone, role: r.role });
    }
  }
  return { user: { id: first.id, email: first.email, name: first.name, sessionId: first.sessionId }, memberships: memberships_ };
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
