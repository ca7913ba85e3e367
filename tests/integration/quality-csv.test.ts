import { afterAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import Papa from "papaparse";
import { signUp } from "../support/accounts.ts";
import { createStudyFixture } from "../support/study-fixture.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { addReferenceRunTx, createPrecisionStudyTx, markReferenceBladeTx, recordPrecisionReadingTx } from "~/server/quality.server.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { instruments, media, mediaLots, protocolVersions, users } from "~/server/db/schema/index.ts";
import { toForceProtocol, type ProtocolContent } from "~/domain/protocol.ts";

afterAll(closeDb);

const parse = (body: string) => Papa.parse<Record<string, string>>(body.trim(), { header: true }).data;

async function labWithQualityRecords() {
  const f = await createStudyFixture({ testers: 2 });
  // A tester whose name would run as a spreadsheet formula: the export must neutralise it.
  await db().update(users).set({ name: "=SUM(1,2)" }).where(eq(users.id, f.testers[0].id));
  const [medium] = await db().insert(media).values({ labId: f.labId, name: "Export rope", kind: "rope", material: "manila", sizeMm: 12 }).returning();
  const [lot] = await db().insert(mediaLots).values({ labId: f.labId, mediumId: medium.id, lotCode: "EX-7", receivedOn: "2026-01-01" }).returning();
  const [inst] = await db().insert(instruments).values({ labId: f.labId, name: "Export tester", kind: "sharpness_tester", testMedium: "line", resolution: 1, calibrationIntervalDays: 30 }).returning();
  const [version] = await db().select().from(protocolVersions).where(eq(protocolVersions.id, f.protocolVersionId));
  const protocol = toForceProtocol(version.content as ProtocolContent)!;
  const values = [150, 152, 161, 163, 148, 149, 158, 160];
  await db().transaction(async (tx) => {
    const ref = await markReferenceBladeTx(tx, f.labId, f.lead.id, { bladeId: f.bladeIds[0], protocolVersionId: f.protocolVersionId });
    const run = await addReferenceRunTx(tx, f.labId, f.lead.id, { referenceId: ref.id, testerId: f.testers[0].id, mediaLotId: lot.id, instrumentId: inst.id, roomTempC: 21, humidityPct: 50 });
    await recordSimulatedRun(tx, { labId: f.labId, runId: run.id, testerId: f.testers[0].id, protocol, model: { baselineMeanGf: 150, baselineSdGf: 5, lossRatePerCut: 4, lossRateSd: 0.2, curvature: 0, noiseSdGf: 4, positionEffectsGf: { heel: 0, middle: 0, tip: 0 } }, seed: "export/1", startAt: new Date(Date.now() - 86_400_000) });
    const study = await createPrecisionStudyTx(tx, f.labId, f.lead.id, { instrumentId: inst.id, name: "Export precision", testerIds: [f.testers[0].id, f.testers[1].id], edgeBladeIds: [f.bladeIds[1], f.bladeIds[2]], repeats: 2, seed: "export-seed" });
    let i = 0;
    for (const step of study.readingOrder) await recordPrecisionReadingTx(tx, f.labId, { studyId: study.id, testerId: step.tester, bladeId: step.edge, repeat: step.repeat, valueGf: values[i++] });
  });
  return { f, inst, lot };
}

describe("CSV exports of reference-run and repeatability readings", () => {
  it("reference-run readings: lot, instrument and tester on every row, formula cells neutralised, analysts see codes only", async () => {
    const { f } = await labWithQualityRecords();
    const url = `/labs/${f.labId}/quality/reference-readings.csv`;
    const lead = await f.lead.client.get(url);
    expect(lead.status).toBe(200);
    expect(lead.headers.get("content-type")).toContain("text/csv");
    const body = await lead.text();
    const rows = parse(body);
    expect(rows.length).toBeGreaterThan(3);
    expect(rows.every((r) => r.media_lot === "EX-7" && r.instrument === "Export tester")).toBe(true);
    expect(rows.every((r) => r.reference_inventory === f.ids.inventory[0])).toBe(true);
    expect(rows.some((r) => r.cut === "0" && Number(r.value) > 0)).toBe(true);
    expect(body).toContain("'=SUM(1,2)");
    expect(body).not.toMatch(/(^|,)=SUM/m);
    const analyst = await (await f.analyst.client.get(url)).text();
    expect(parse(analyst).length).toBe(rows.length);
    expect(analyst).not.toContain(f.ids.inventory[0]);
    expect(analyst).not.toContain(f.ids.steels[0]);
    expect(parse(analyst)[0].reference_code).toMatch(/^[A-Z0-9]{3}-[A-Z0-9]{3}$/);
    // The quality page links the export.
    expect(await (await f.lead.client.get(`/labs/${f.labId}/quality`)).text()).toContain(url);
  });

  it("repeatability readings of an instrument: every reading in gf, analysts get edges by place", async () => {
    const { f, inst } = await labWithQualityRecords();
    const url = `/labs/${f.labId}/instruments/${inst.id}/repeatability-readings.csv`;
    const rows = parse(await (await f.owner.client.get(url)).text());
    expect(rows.length).toBe(8);
    expect(rows.map((r) => Number(r.value_gf)).sort((a, b) => a - b)).toEqual([148, 149, 150, 152, 158, 160, 161, 163]);
    expect(new Set(rows.map((r) => r.edge))).toEqual(new Set([f.ids.inventory[1], f.ids.inventory[2]]));
    expect(rows.every((r) => r.seed === "export-seed" && /^[0-9a-f]{64}$/.test(r.content_hash))).toBe(true);
    const analyst = await (await f.analyst.client.get(url)).text();
    expect(new Set(parse(analyst).map((r) => r.edge))).toEqual(new Set(["edge 1", "edge 2"]));
    expect(analyst).not.toContain(f.ids.inventory[1]);
    expect(await (await f.lead.client.get(`/labs/${f.labId}/instruments/${inst.id}`)).text()).toContain(url);
  });

  it("testers get 403, another lab 404, and an unknown instrument 404", async () => {
    const { f, inst } = await labWithQualityRecords();
    const urls = [`/labs/${f.labId}/quality/reference-readings.csv`, `/labs/${f.labId}/instruments/${inst.id}/repeatability-readings.csv`];
    const other = await signUp("Other Owner");
    for (const url of urls) {
      expect((await f.testers[0].client.get(url)).status).toBe(403);
      expect((await other.client.get(url)).status).toBe(404);
    }
    // Another lab's owner asking in their own lab for this lab's instrument.
    expect((await other.client.get(`/labs/${other.labId}/instruments/${inst.id}/repeatability-readings.csv`)).status).toBe(404);
    expect((await f.lead.client.get(`/labs/${f.labId}/instruments/not-a-uuid/repeatability-readings.csv`)).status).toBe(404);
  });
});
