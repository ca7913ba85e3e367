import { data, redirect } from "react-router";
import { and, eq } from "drizzle-orm";
import { db } from "./db.server.ts";
import { labs, memberships, type LabRole } from "./db/schema/index.ts";
import { getSessionUser, type SessionUser } from "./session.server.ts";

export const ALL_ROLES: LabRole[] = ["owner", "lead", "tester", "analyst"];
export const MANAGERS: LabRole[] = ["owner", "lead"];

/** The signed-in user, or a redirect to sign-in that comes back here afterwards. */
export async function requireUser(request: Request): Promise<SessionUser> {
  const user = await getSessionUser(request);
  if (!user) {
    const url = new URL(request.url);
    const back = `${url.pathname}${url.search}`;
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(back)}`);
  }
  return user;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function notFound(): never {
  throw data("This page does not exist, or it belongs to a lab you are not a member of.", { status: 404 });
}

/**
 * The user's membership of a lab, read from the database on every request.
 * 404 (not 403) when the user is not a member, so lab ids cannot be probed;
 * 403 when the member's role is not among `roles`.
 */
export async function requireLabRole(request: Request, labId: string | undefined, roles: readonly LabRole[]) {
  const user = await requireUser(request);
  if (!labId || !UUID.test(labId)) notFound();
  const [row] = await db()
    .select({ role: memberships.role, labId: labs.id, labName: labs.name })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .where(and(eq(memberships.labId, labId), eq(memberships.userId, user.id)))
    .limit(1);
  if (!row) notFound();
  if (!roles.includes(row.role)) {
    throw data("Your role in this lab does not include this page.", { status: 403 });
  }
  return { user, role: row.role, lab: { id: row.labId, name: row.labName } };
}

export function isUuid(value: string | undefined): value is string {
  return !!value && UUID.test(value);
}
