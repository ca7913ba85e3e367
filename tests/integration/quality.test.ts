import { afterAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import { signUp } from "../support/accounts.ts";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { addReferenceRunTx } from "~/server/quality.server.ts";
import { instruments, media, mediaLots, referenceBlades } from "~/server/db/schema/index.ts";

afterAll(closeDb);

const text = async (r: Response) => (await r.text()).replace(/<!-- -->/g, "");

describe("reference blades and the quality page", () => {
  it("a lead marks a reference with its protocol version; the chart shows its points without limits and says why", async () => {
    const f = await createStudyFixture();
    const marked = await f.lead.client.post(`/labs/${f.labId}/quality`, { bladeId: f.bladeIds[0], protocolVersionId: f.protocolVersionId });
    expect(marked.status).toBe(200);
    const [ref] = await db().select().from(referenceBlades).where(eq(referenceBlades.labId, f.labId));
    expect(ref.protocolVersionId).toBe(f.protocolVersionId);
    const [medium] = await db().insert(media).values({ labId: f.labId, name: "Test rope", kind: "rope", material: "manila", sizeMm: 12 }).returning();
    const [lot] = await db().insert(mediaLots).values({ labId: f.labId, mediumId: medium.id, lotCode: "L-1", receivedOn: "2026-01-01" }).returning();
    const [inst] = await db().insert(instruments).values({ labId: f.labId, name: "Tester Q", kind: "sharpness_tester", testMedium: "line", resolution: 1, calibrationIntervalDays: 30 }).returning();
    const run = await db().transaction((tx) => addReferenceRunTx(tx, f.labId, f.lead.id, { referenceId: ref.id, testerId: f.testers[0].id, mediaLotId: lot.id, instrumentId: inst.id, roomTempC: 21, humidityPct: 50 }));
    expect(run.mediaLotId).toBe(lot.id);
    const page = await text(await f.analyst.client.get(`/labs/${f.labId}/quality`));
    // Analysts see the reference by its code, never its inventory number; leads see both.
    expect(page).not.toContain(f.ids.inventory[0]);
    expect(page).toMatch(/Reference [A-Z0-9]{3}-[A-Z0-9]{3}/);
    expect(await text(await f.lead.client.get(`/labs/${f.labId}/quality`))).toContain(f.ids.inventory[0]);
    expect(page).toContain("declared as 12 points and only 0 exist");
    // The reference series is not a study to compare: the studies list leaves it out.
    const list = await text(await f.lead.client.get(`/labs/${f.labId}/studies`));
    expect(list).not.toContain("Reference series");
    // Audit events for the reference and its run.
    const events = await db().execute(sql`SELECT action FROM audit_events WHERE lab_id = ${f.labId} AND action LIKE 'quality.%' ORDER BY seq`);
    expect(events.rows.map((r) => r.action)).toEqual(["quality.reference_marked", "quality.reference_run_assigned"]);
  });

  it("refuses a reference without a protocol version, a blade marked twice, and writes nothing", async () => {
    const f = await createStudyFixture();
    const none = await f.lead.client.post(`/labs/${f.labId}/quality`, { bladeId: f.bladeIds[1], protocolVersionId: "" });
    expect(none.status).toBe(400);
    expect(await text(none)).toContain("Choose the protocol version the reference is cut under.");
    expect((await db().select().from(referenceBlades).where(eq(referenceBlades.labId, f.labId))).length).toBe(0);
    expect((await f.lead.client.post(`/labs/${f.labId}/quality`, { bladeId: f.bladeIds[1], protocolVersionId: f.protocolVersionId })).status).toBe(200);
    const twice = await f.lead.client.post(`/labs/${f.labId}/quality`, { bladeId: f.bladeIds[1], protocolVersionId: f.protocolVersionId });
    expect(twice.status).toBe(409);
    expect((await db().select().from(referenceBlades).where(eq(referenceBlades.labId, f.labId))).length).toBe(1);
  });

  it("testers cannot open the page; analysts read but cannot mark; another lab cannot use this lab's blade", async () => {
    const f = await createStudyFixture();
    expect((await f.testers[0].client.get(`/labs/${f.labId}/quality`)).status).toBe(403);
    expect((await f.analyst.client.get(`/labs/${f.labId}/quality`)).status).toBe(200);
    expect((await f.analyst.client.post(`/labs/${f.labId}/quality`, { bladeId: f.bladeIds[0], protocolVersionId: f.protocolVersionId })).status).toBe(403);
    const other = await signUp("Other Owner");
    expect((await other.client.get(`/labs/${f.labId}/quality`)).status).toBe(404);
    const foreign = await other.client.post(`/labs/${other.labId}/quality`, { bladeId: f.bladeIds[0], protocolVersionId: f.protocolVersionId });
    expect(foreign.status).toBe(404);
    expect(await text(foreign)).toContain("No such blade in this lab.");
    expect((await db().select().from(referenceBlades)).filter((r) => r.labId === other.labId).length).toBe(0);
  });
});
