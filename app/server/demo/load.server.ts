import { eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { invitations, labs, memberships, users } from "../db/schema/index.ts";
import { randomToken, tokenHash } from "../tokens.server.ts";
import { recordAudit } from "../audit.server.ts";
import { hashPassword } from "../password.server.ts";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "./accounts.ts";
import { loadDemoLibrary } from "./library.server.ts";
import { loadDemoStudies } from "./studies.server.ts";
import { loadDemoProtocols } from "./protocols.server.ts";
import { loadDemoQuality } from "./quality.server.ts";

export const DEMO_LAB_NAME = "Demo Edge Lab (invented)";
/** The demo lab keeps its times in a zone other than UTC, so its pages show the lab's zone at work. */
export const DEMO_TIME_ZONE = "Europe/Berlin";

/** Creates the invented demo lab once; every part of it is generated and labelled as invented. */
export async function loadDemoData(): Promise<{ created: boolean; labId: string }> {
  const existing = await db().select({ id: labs.id }).from(labs).where(eq(labs.isDemo, true)).limit(1);
  if (existing[0]) return { created: false, labId: existing[0].id };
  const hashes = await Promise.all(DEMO_ACCOUNTS.map(() => hashPassword(DEMO_PASSWORD)));
  return db().transaction(async (tx) => {
    const [lab] = await tx.insert(labs).values({ name: DEMO_LAB_NAME, isDemo: true, timeZone: DEMO_TIME_ZONE }).returning();
    await recordAudit(tx, { labId: lab.id, actorId: null, action: "lab.created", objectType: "lab", objectId: lab.id, details: { demo: true } });
    const people: Record<string, string> = {};
    for (const [i, account] of DEMO_ACCOUNTS.entries()) {
      const [user] = await tx.insert(users).values({ email: account.email, name: account.name, passwordHash: hashes[i] }).returning();
      people[account.email] = user.id;
      await tx.insert(memberships).values({ labId: lab.id, userId: user.id, role: account.role });
      await recordAudit(tx, { labId: lab.id, actorId: null, action: "member.joined", objectType: "user", objectId: user.id, details: { role: account.role, demo: true } });
    }
    // A pending invitation for the lab home's list. Its token is thrown away: nobody can accept it.
    const [invite] = await tx
      .insert(invitations)
      .values({ labId: lab.id, email: "new-tester@demo.test", role: "tester", tokenHash: tokenHash(randomToken()), invitedBy: people["owner@demo.test"], expiresAt: new Date(Date.now() + 14 * 86_400_000) })
      .returning();
    await recordAudit(tx, { labId: lab.id, actorId: people["owner@demo.test"], action: "member.invited", objectType: "invitation", objectId: invite.id, details: { email: invite.email, role: "tester", demo: true } });
    const library = await loadDemoLibrary(tx, lab.id, people["lead@demo.test"]);
    const protocols = await loadDemoProtocols(tx, lab.id, people["lead@demo.test"], library);
    await loadDemoStudies(tx, lab.id, { ownerId: people["owner@demo.test"], leadId: people["lead@demo.test"], testerIds: [people["tester@demo.test"], people["tester2@demo.test"]] }, library, protocols);
    await loadDemoQuality(tx, lab.id, { leadId: people["lead@demo.test"], testerIds: [people["tester@demo.test"], people["tester2@demo.test"]] }, library, protocols);
    return { created: true, labId: lab.id };
  });
}
