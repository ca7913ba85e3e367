import { data, redirect } from "react-router";
import type { LabRole } from "./db/schema/index.ts";
import { getSignedIn, type SessionUser, type SignedIn } from "./session.server.ts";

export const ALL_ROLES: LabRole[] = ["owner", "lead", "tester", "analyst"];
export const MANAGERS: LabRole[] = ["owner", "lead"];

/** The signed-in user, or a redirect to sign-in that comes back here afterwards. */
export async function requireUser(request: Request): Promise<SessionUser> {
  return (await requireSignedIn(request)).user;
}

async function requireSignedIn(request: Request): Promise<SignedIn> {
  const signedIn = await getSignedIn(request);
  if (!signedIn) {
    const url = new URL(request.url);
    const back = `${url.pathname}${url.search}`;
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(back)}`);
  }
  return signedIn;
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
  // The memberships come with the session in one statement, read on every request.
  const { user, memberships } = await requireSignedIn(request);
  if (!labId || !UUID.test(labId)) notFound();
  const row = memberships.find((m) => m.labId === labId);
  if (!row) notFound();
  if (!roles.includes(row.role)) {
    throw data("Your role in this lab does not include this page.", { status: 403 });
  }
  return { user, role: row.role, lab: { id: row.labId, name: row.labName, timeZone: row.timeZone } };
}

export function isUuid(value: string | undefined): value is string {
  return !!value && UUID.test(value);
}
