import { and, asc, count, desc, eq, gt, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import { db } from "./db.server.ts";
import { invitations, labs, memberships, passwordResets, sessions, signInFailures, users, type LabRole } from "./db/schema/index.ts";
import { recordAudit } from "./audit.server.ts";
import { hashPassword, verifyPassword } from "./password.server.ts";
import { randomToken, tokenHash } from "./tokens.server.ts";
import { createUserSession, endOtherSessions } from "./session.server.ts";

export const INVITATION_DAYS = 7;
export const RESET_MINUTES = 60;

export const PasswordSchema = z
  .string()
  .min(10, "Use at least 10 characters")
  .max(200, "Use at most 200 characters");

export const SignUpSchema = z.object({
  name: z.string().trim().min(1, "Enter your name").max(120, "Keep your name under 120 characters"),
  email: z.string().trim().toLowerCase().email("Enter a valid e-mail address"),
  password: PasswordSchema,
  labName: z.string().trim().min(2, "Name your lab (at least 2 characters)").max(120, "Keep the lab name under 120 characters"),
});

/** A user mistake the form can show (never a 500). */
export class UserFacingError extends Error {
  constructor(
    message: string,
    readonly field?: string,
    readonly status = 400,
  ) {
    super(message);
  }
}

export async function findUserByEmail(email: string) {
  const [user] = await db().select().from(users).where(sql`lower(${users.email}) = ${email.toLowerCase()}`).limit(1);
  return user ?? null;
}

/** Signing up creates the person, their lab, and their owner membership, in one transaction. */
export async function signUp(input: z.infer<typeof SignUpSchema>) {
  if (await findUserByEmail(input.email)) throw new UserFacingError("An account with this e-mail already exists: sign in instead", "email");
  const passwordHash = await hashPassword(input.password);
  return db().transaction(async (tx) => {
    const [user] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash }).returning();
    const [lab] = await tx.insert(labs).values({ name: input.labName }).returning();
    await tx.insert(memberships).values({ labId: lab.id, userId: user.id, role: "owner" });
    await recordAudit(tx, { labId: lab.id, actorId: user.id, action: "lab.created", objectType: "lab", objectId: lab.id });
    const cookie = await createUserSession(user.id, tx);
    return { user, lab, cookie };
  });
}

export async function labsOfUser(userId: string) {
  return db()
    .select({ id: labs.id, name: labs.name, role: memberships.role, isDemo: labs.isDemo })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(labs.name));
}

export async function membersOfLab(labId: string) {
  return db()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.labId, labId))
    .orderBy(asc(users.name));
}

/** Which roles a member may hand out: only an owner makes another owner. */
export function invitableRoles(role: LabRole): LabRole[] {
  if (role === "owner") return ["owner", "lead", "tester", "analyst"];
  if (role === "lead") return ["tester", "analyst"];
  return [];
}

async function ownerCount(tx: Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0], labId: string) {
  // Lock the lab's owner rows so two owners cannot demote each other at the same moment.
  const rows = await tx.execute(sql`SELECT user_id FROM memberships WHERE lab_id = ${labId} AND role = 'owner' FOR UPDATE`);
  return rows.rows.length;
}

export async function changeMemberRole(actorId: string, labId: string, userId: string, role: LabRole) {
  return db().transaction(async (tx) => {
    const [member] = await tx.select().from(memberships).where(and(eq(memberships.labId, labId), eq(memberships.userId, userId))).for("update");
    if (!member) throw new UserFacingError("That person is not a member of this lab", undefined, 404);
    if (member.role === role) return;
    if (member.role === "owner" && (await ownerCount(tx, labId)) <= 1) {
      throw new UserFacingError("The lab's last owner cannot be demoted: make another member an owner first", "role", 409);
    }
    await tx.update(memberships).set({ role }).where(and(eq(memberships.labId, labId), eq(memberships.userId, userId)));
    await recordAudit(tx, { labId, actorId, action: "member.role_changed", objectType: "user", objectId: userId, details: { from: member.role, to: role } });
  });
}

export async function removeMember(actorId: string, labId: string, userId: string) {
  return db().transaction(async (tx) => {
    const [member] = await tx.select().from(memberships).where(and(eq(memberships.labId, labId), eq(memberships.userId, userId))).for("update");
    if (!member) throw new UserFacingError("That person is not a member of this lab", undefined, 404);
    if (member.role === "owner" && (await ownerCount(tx, labId)) <= 1) {
      throw new UserFacingError("The lab's last owner cannot be removed", undefined, 409);
    }
    await tx.delete(memberships).where(and(eq(memberships.labId, labId), eq(memberships.userId, userId)));
    await recordAudit(tx, { labId, actorId, action: "member.removed", objectType: "user", objectId: userId, details: { role: member.role } });
  });
}

export const InviteSchema = z.object({
  email: z.string().trim().toLowerCase().email("Enter the e-mail address to invite"),
  role: z.enum(["owner", "lead", "tester", "analyst"], { message: "Choose a role" }),
});

/** Creates an invitation and returns the token for the e-mail link (only its hash is stored). */
export async function createInvitation(actor: { id: string; role: LabRole }, labId: string, input: z.infer<typeof InviteSchema>) {
  if (!invitableRoles(actor.role).includes(input.role)) {
    throw new UserFacingError(`As a ${actor.role} you can invite ${invitableRoles(actor.role).join(" or ")} only`, "role", 403);
  }
  const [already] = await db()
    .select({ id: users.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.labId, labId), sql`lower(${users.email}) = ${input.email}`));
  if (already) throw new UserFacingError("This person is already a member of the lab", "email");
  const token = randomToken();
  const invitation = await db().transaction(async (tx) => {
    const [row] = await tx
      .insert(invitations)
      .values({
        labId,
        email: input.email,
        role: input.role,
        tokenHash: tokenHash(token),
        invitedBy: actor.id,
        expiresAt: new Date(Date.now() + INVITATION_DAYS * 24 * 3600 * 1000),
      })
      .returning();
    await recordAudit(tx, { labId, actorId: actor.id, action: "member.invited", objectType: "invitation", objectId: row.id, details: { email: input.email, role: input.role } });
    return row;
  });
  return { invitation, token };
}

export type InvitationState = "pending" | "accepted" | "expired" | "revoked";
export function invitationState(i: { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date }, now = new Date()): InvitationState {
  if (i.acceptedAt) return "accepted";
  if (i.revokedAt) return "revoked";
  if (i.expiresAt <= now) return "expired";
  return "pending";
}

export async function invitationsOfLab(labId: string) {
  const rows = await db().select().from(invitations).where(eq(invitations.labId, labId)).orderBy(desc(invitations.createdAt));
  return rows.map((r) => ({ id: r.id, email: r.email, role: r.role, createdAt: r.createdAt, expiresAt: r.expiresAt, state: invitationState(r) }));
}

export async function revokeInvitation(actor: { id: string; role: LabRole }, labId: string, invitationId: string) {
  const actorId = actor.id;
  await db().transaction(async (tx) => {
    const [row] = await tx.select().from(invitations).where(and(eq(invitations.id, invitationId), eq(invitations.labId, labId))).for("update");
    if (!row) throw new UserFacingError("No such invitation in this lab", undefined, 404);
    // Revoking is granting in reverse: only a role that may hand out this role may take it back.
    if (!invitableRoles(actor.role).includes(row.role)) throw new UserFacingError(`As a ${actor.role} you cannot revoke an invitation of ${row.role === "owner" ? "an" : "a"} ${row.role}`, undefined, 403);
    if (invitationState(row) !== "pending") throw new UserFacingError("Only a pending invitation can be revoked", undefined, 409);
    await tx.update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, invitationId));
    await recordAudit(tx, { labId, actorId, action: "member.invitation_revoked", objectType: "invitation", objectId: invitationId, details: { email: row.email } });
  });
}

/** The invitation behind a link, if it can still be accepted. */
export async function openInvitation(token: string) {
  const [row] = await db()
    .select({ invitation: invitations, labName: labs.name })
    .from(invitations)
    .innerJoin(labs, eq(labs.id, invitations.labId))
    .where(eq(invitations.tokenHash, tokenHash(token)))
    .limit(1);
  if (!row) return { ok: false as const, reason: "This invitation link is not valid. Ask the lab for a new one." };
  const state = invitationState(row.invitation);
  if (state !== "pending") {
    const reason = {
      accepted: "This invitation has already been used. Sign in instead.",
      expired: "This invitation has expired. Ask the lab for a new one.",
      revoked: "This invitation was withdrawn by the lab.",
    }[state];
    return { ok: false as const, reason };
  }
  const existingUser = await findUserByEmail(row.invitation.email);
  return { ok: true as const, invitation: row.invitation, labName: row.labName, existingUserId: existingUser?.id ?? null };
}

export const AcceptNewSchema = z.object({
  name: z.string().trim().min(1, "Enter your name").max(120, "Keep your name under 120 characters"),
  password: PasswordSchema,
});

/**
 * Accepts an invitation: a new person is created with the password they chose, an
 * existing user joins with one click. The token is spent inside the same transaction.
 */
export async function acceptInvitation(token: string, who: { userId: string } | { name: string; password: string }) {
  const passwordHash = "password" in who ? await hashPassword(who.password) : null;
  return db().transaction(async (tx) => {
    const [invitation] = await tx.select().from(invitations).where(eq(invitations.tokenHash, tokenHash(token))).for("update");
    if (!invitation || invitationState(invitation) !== "pending") throw new UserFacingError("This invitation can no longer be used", undefined, 410);
    let userId: string;
    if ("userId" in who) {
      const [user] = await tx.select().from(users).where(eq(users.id, who.userId));
      if (!user || user.email.toLowerCase() !== invitation.email.toLowerCase()) {
        throw new UserFacingError(`This invitation is for ${invitation.email}. Sign in with that address to accept it.`, undefined, 403);
      }
      userId = user.id;
    } else {
      const [taken] = await tx.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${invitation.email.toLowerCase()}`);
      if (taken) throw new UserFacingError("An account with this e-mail exists: sign in to accept", undefined, 409);
      const [user] = await tx.insert(users).values({ email: invitation.email, name: who.name, passwordHash: passwordHash! }).returning();
      userId = user.id;
    }
    await tx.insert(memberships).values({ labId: invitation.labId, userId, role: invitation.role }).onConflictDoNothing();
    await tx.update(invitations).set({ acceptedAt: new Date() }).where(eq(invitations.id, invitation.id));
    await recordAudit(tx, { labId: invitation.labId, actorId: userId, action: "member.joined", objectType: "invitation", objectId: invitation.id, details: { role: invitation.role } });
    const cookie = await createUserSession(userId, tx);
    return { labId: invitation.labId, userId, cookie };
  });
}

/** Starts a reset when the address exists; the caller answers the same either way. */
export async function startPasswordReset(email: string): Promise<{ token: string; user: { email: string; name: string } } | null> {
  const user = await findUserByEmail(email);
  if (!user) return null;
  const token = randomToken();
  await db().insert(passwordResets).values({ tokenHash: tokenHash(token), userId: user.id, expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) });
  return { token, user: { email: user.email, name: user.name } };
}

export async function resetTokenValid(token: string) {
  const [row] = await db()
    .select()
    .from(passwordResets)
    .where(and(eq(passwordResets.tokenHash, tokenHash(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())));
  return !!row;
}

/** Sets a new password from a reset link: single use, and every session of the user ends. */
export async function completePasswordReset(token: string, password: string) {
  const passwordHash = await hashPassword(password);
  return db().transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(passwordResets)
      .where(and(eq(passwordResets.tokenHash, tokenHash(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
      .for("update");
    if (!row) throw new UserFacingError("This reset link has expired or was already used. Ask for a new one.", undefined, 410);
    // This link is spent, and so is every other unused link of the user.
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt)));
    await tx.update(users).set({ passwordHash }).where(eq(users.id, row.userId));
    await endOtherSessions(tx, row.userId, null);
    // The reset path lifts a sign-in pause of the account: the owner is never locked out for long.
    const [owner] = await tx.select({ email: users.email }).from(users).where(eq(users.id, row.userId));
    await tx.delete(signInFailures).where(eq(signInFailures.email, owner.email.toLowerCase()));
    await recordAudit(tx, { labId: null, actorId: row.userId, action: "user.password_reset", objectType: "user", objectId: row.userId });
    return { cookie: await createUserSession(row.userId, tx) };
  });
}

export const ChangePasswordSchema = z
  .object({ currentPassword: z.string().min(1, "Enter your current password"), newPassword: PasswordSchema })
  .refine((v) => v.currentPassword !== v.newPassword, { message: "Choose a password different from the current one", path: ["newPassword"] });

/** Changes the password and ends the user's other sessions (this one stays). */
export async function changePassword(userId: string, sessionId: string, input: z.infer<typeof ChangePasswordSchema>) {
  const [user] = await db().select().from(users).where(eq(users.id, userId));
  if (!user || !(await verifyPassword(user.passwordHash, input.currentPassword))) {
    throw new UserFacingError("That is not your current password", "currentPassword");
  }
  const passwordHash = await hashPassword(input.newPassword);
  await db().transaction(async (tx) => {
    await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
    await endOtherSessions(tx, userId, sessionId);
    await recordAudit(tx, { labId: null, actorId: userId, action: "user.password_changed", objectType: "user", objectId: userId });
  });
}

export async function sessionCount(userId: string) {
  const [row] = await db().select({ n: count() }).from(sessions).where(eq(sessions.userId, userId));
  return row.n;
}
