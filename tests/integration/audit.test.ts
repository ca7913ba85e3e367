import { afterAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { db, closeDb } from "~/server/db.server.ts";
import { recordAudit, auditContent } from "~/server/audit.server.ts";
import { labs, auditEvents } from "~/server/db/schema/index.ts";
import { canonicalHash } from "~/domain/canonical-hash.ts";
import { eq, asc } from "drizzle-orm";

afterAll(closeDb);

describe("audit events", () => {
  it("chains each event to the previous one of its lab", async () => {
    const [lab] = await db().insert(labs).values({ name: "Chain test lab" }).returning();
    await db().transaction((tx) => recordAudit(tx, { labId: lab.id, actorId: null, action: "lab.created" }));
    await db().transaction((tx) => recordAudit(tx, { labId: lab.id, actorId: null, action: "member.invited", details: { role: "tester" } }));
    const events = await db().select().from(auditEvents).where(eq(auditEvents.labId, lab.id)).orderBy(asc(auditEvents.seq));
    expect(events).toHaveLength(2);
    expect(events[0].prevHash).toBeNull();
    expect(events[1].prevHash).toBe(events[0].hash);
    // The stored hash is the hash of the stored content: recomputable by anyone.
    for (const e of events) expect(canonicalHash(auditContent(e))).toBe(e.hash);
  });

  it("refuses UPDATE and DELETE in the database itself", async () => {
    const [lab] = await db().insert(labs).values({ name: "Append-only lab" }).returning();
    await db().transaction((tx) => recordAudit(tx, { labId: lab.id, actorId: null, action: "lab.created" }));
    await expect(db().execute(sql`UPDATE audit_events SET action = 'edited' WHERE lab_id = ${lab.id}`)).rejects.toMatchObject({ cause: { message: expect.stringMatching(/append-only/) } });
    await expect(db().execute(sql`DELETE FROM audit_events WHERE lab_id = ${lab.id}`)).rejects.toMatchObject({ cause: { message: expect.stringMatching(/append-only/) } });
  });
});
