// The bench through the real production build: access, starting a run, saving readings
// once per key under concurrency, the stop rule applied by the server, corrections,
// events and photos, CSV import all or nothing, the lead's actions, and blinding.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, asc, eq, sql } from "drizzle-orm";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import type { AppClient } from "../support/app-client.ts";
import { TINY_PNG, multipartWithFile } from "../support/images.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { readings, runEvents, runs, studies, studyBlades, auditEvents } from "~/server/db/schema/index.ts";
import { addCalibrationCheck, createInstrument, createLot, createMedium } from "~/server/library.server.ts";
import { BLIND_CODE_ALPHABET, formatBlindCode, normalizeBlindCode } from "~/domain/blind-codes.ts";

afterAll(closeDb);

type Setup = { f: StudyFixture; lotId: string; instrumentId: string; flaggedInstrumentId: string };

async function benchSetup(options: Parameters<typeof createStudyFixture>[0] = {}): Promise<Setup> {
  const f = await createStudyFixture({ state: "running", testers: 2, ...options });
  const medium = await createMedium(f.labId, f.lead.id, { name: "Fixture rope", kind: "rope", material: "manila", sizeMm: 10, notes: "" });
  const lot = await createLot(f.labId, f.lead.id, medium.id, { lotCode: "LOT-1", receivedOn: "2024-01-10", conditioning: "" });
  const instrument = await createInstrument(f.labId, f.lead.id, { name: "Edge tester one", kind: "sharpness_tester", testMedium: "test wire", resolution: 1, maxReading: 2000, calibrationIntervalDays: 365 });
  await addCalibrationCheck(f.labId, f.lead.id, instrument.id, { on: new Date().toISOString().slice(0, 10), referenceValue: 300, reading: 301, tolerance: 5, notes: "" });
  const flagged = await createInstrument(f.labId, f.lead.id, { name: "Edge tester unchecked", kind: "sharpness_tester", testMedium: "test wire", resolution: 1, maxReading: 2000, calibrationIntervalDays: 365 });
  return { f, lotId: lot.id, instrumentId: instrument.id, flaggedInstrumentId: flagged.id };
}

async function runsOf(f: StudyFixture, testerIndex: number) {
  return db()
    .select({ id: runs.id, state: runs.state, attempt: runs.attempt, code: studyBlades.blindCode, schedulePosition: runs.schedulePosition })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .where(and(eq(runs.studyId, f.studyId), eq(runs.testerId, f.testers[testerIndex].id)))
    .orderBy(asc(runs.schedulePosition));
}

const runUrl = (labId: string, runId: string) => `/labs/${labId}/bench/runs/${runId}`;
const api = (labId: string, runId: string, what: string) => `/labs/${labId}/api/runs/${runId}/${what}`;

function startFields(s: Setup, code: string, extra: Record<string, string | string[]> = {}) {
  return { intent: "start", blindCode: code, sharpening: ["0", "1", "2"].slice(0, 3), safety: ["0", "1", "2", "3", "4", "5"], mediaLotId: s.lotId, instrumentId: s.instrumentId, roomTempC: "21.5", humidityPct: "48", ...extra };
}

async function startRun(s: Setup, client: AppClient, run: { id: string; code: string | null }, extra: Record<string, string | string[]> = {}) {
  const res = await client.post(runUrl(s.f.labId, run.id), startFields(s, formatBlindCode(run.code!), extra));
  expect(res.status, await res.clone().text().then((t) => t.slice(0, 300))).toBe(200);
  return res;
}

let counter = 0;
const key = () => `key-${Date.now()}-${++counter}-${Math.random().toString(36).slice(2)}`;
const post = (client: AppClient, s: Setup, runId: string, body: Record<string, unknown>) => client.postJson(api(s.f.labId, runId, "readings"), { idempotencyKey: key(), kind: "check", ...body });

async function check(client: AppClient, s: Setup, runId: string, cut: number, value: number) {
  for (const position of ["heel", "middle", "tip"]) {
    const res = await post(client, s, runId, { cut, position, value });
    expect(res.status, await res.clone().text()).toBe(201);
  }
}

async function readingCount(runId: string) {
  const [{ n }] = await db().select({ n: sql<number>`count(*)::int` }).from(readings).where(eq(readings.runId, runId));
  return n;
}

describe("the bench", () => {
  let s: Setup;
  beforeAll(async () => {
    s = await benchSetup({ cap: 6, checkEvery: 2, replicates: 2 });
  });

  it("the queue lists the tester's own runs in schedule order by blind code, and none of another tester's", async () => {
    const mine = await runsOf(s.f, 0);
    const theirs = await runsOf(s.f, 1);
    const res = await s.f.testers[0].client.get("/bench");
    expect(res.status).toBe(200);
    const html = await res.text();
    for (const r of mine) expect(html).toContain(formatBlindCode(r.code!));
    expect(html).toContain(`Fixture study ${s.f.tag}`);
    const positions = mine.map((r) => html.indexOf(`#<!-- -->${r.schedulePosition}`)).filter((i) => i >= 0);
    expect(positions).toHaveLength(mine.length);
    expect(positions).toEqual([...positions].sort((a, b) => a - b));
    for (const r of theirs) expect(html).not.toContain(`/bench/runs/${r.id}`);
  });

  it("refuses a wrong check character at once, and a valid code of another blade", async () => {
    const [run] = await runsOf(s.f, 0);
    const code = normalizeBlindCode(run.code!);
    const last = code[code.length - 1];
    const wrong = code.slice(0, -1) + BLIND_CODE_ALPHABET[(BLIND_CODE_ALPHABET.indexOf(last) + 1) % 36];
    const bad = await s.f.testers[0].client.post(runUrl(s.f.labId, run.id), startFields(s, wrong));
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain("The last character does not match");
    const [other] = await db().select({ code: studyBlades.blindCode }).from(studyBlades).where(and(eq(studyBlades.studyId, s.f.studyId), sql`${studyBlades.blindCode} <> ${code}`)).limit(1);
    const another = await s.f.testers[0].client.post(runUrl(s.f.labId, run.id), startFields(s, other.code!));
    expect(another.status).toBe(400);
    expect(await another.text()).toContain("a valid code, but of another blade");
    const [still] = await db().select({ state: runs.state }).from(runs).where(eq(runs.id, run.id));
    expect(still.state).toBe("waiting");
  });

  it("refuses a start with a step unticked", async () => {
    const [run] = await runsOf(s.f, 0);
    const res = await s.f.testers[0].client.post(runUrl(s.f.labId, run.id), startFields(s, run.code!, { safety: ["0", "1"] }));
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("Tick every item of the safety checklist");
  });

  it("starting a run out of order asks for a reason and records a deviation with an audit event", async () => {
    const mine = await runsOf(s.f, 1);
    const later = mine[1];
    const without = await s.f.testers[1].client.post(runUrl(s.f.labId, later.id), startFields(s, later.code!));
    expect(without.status).toBe(400);
    expect(await without.text()).toContain("This is not your next run in the schedule");
    await startRun(s, s.f.testers[1].client, later, { reason: "The first blade is still at the preparer's bench" });
    const events = await db().select().from(runEvents).where(eq(runEvents.runId, later.id));
    expect(events.map((e) => e.kind)).toEqual(["deviation"]);
    expect(events[0].note).toContain("still at the preparer's bench");
    const audit = await db().select().from(auditEvents).where(and(eq(auditEvents.labId, s.f.labId), eq(auditEvents.objectId, later.id)));
    expect(audit.map((a) => a.action)).toEqual(["run.deviation"]);
  });

  it("records a flagged instrument on the run", async () => {
    const [, second] = await runsOf(s.f, 0);
    // The first run is the next one; the second needs a reason.
    await startRun(s, s.f.testers[0].client, second, { instrumentId: s.flaggedInstrumentId, reason: "Testing the flagged instrument path" });
    const [row] = await db().select({ flagged: runs.instrumentFlagged, state: runs.state, temp: runs.roomTempC, humidity: runs.humidityPct }).from(runs).where(eq(runs.id, second.id));
    expect(row).toEqual({ flagged: true, state: "in_progress", temp: 21.5, humidity: 48 });
  });

  it("stores one reading per idempotency key: a repeated POST answers the stored reading with 200", async () => {
    const [run] = await runsOf(s.f, 0);
    await startRun(s, s.f.testers[0].client, run);
    const body = { idempotencyKey: key(), cut: 0, position: "heel", kind: "check", value: 152 };
    const first = await s.f.testers[0].client.postJson(api(s.f.labId, run.id, "readings"), body);
    expect(first.status).toBe(201);
    const again = await s.f.testers[0].client.postJson(api(s.f.labId, run.id, "readings"), body);
    expect(again.status).toBe(200);
    const [a, b] = [await first.json(), await again.json()];
    expect(b.replay).toBe(true);
    expect(b.reading.id).toBe(a.reading.id);
    expect(await readingCount(run.id)).toBe(1);
    const [stored] = await db().select().from(readings).where(eq(readings.runId, run.id));
    expect(stored.contentHash).toMatch(/^[0-9a-f]{64}$/);
    // The same key with another value is refused, not stored.
    const clash = await s.f.testers[0].client.postJson(api(s.f.labId, run.id, "readings"), { ...body, value: 999 });
    expect(clash.status).toBe(409);
    expect(await readingCount(run.id)).toBe(1);
  });

  it("refuses a second reading at the same position, an unknown position and a cut off the schedule, with messages", async () => {
    const [run] = await runsOf(s.f, 0);
    const dup = await post(s.f.testers[0].client, s, run.id, { cut: 0, position: "heel", value: 150 });
    expect(dup.status).toBe(409);
    expect((await dup.json()).error).toMatch(/already saved: correct it instead/);
    const unknown = await post(s.f.testers[0].client, s, run.id, { cut: 0, position: "spine", value: 150 });
    expect(unknown.status).toBe(400);
    const off = await post(s.f.testers[0].client, s, run.id, { cut: 3, position: "tip", value: 150 });
    expect(off.status).toBe(400);
    expect((await off.json()).error).toMatch(/Cut 3 is not a check/);
    const invalid = await s.f.testers[0].client.postJson(api(s.f.labId, run.id, "readings"), { idempotencyKey: key(), cut: "zero", position: "tip", value: -1 });
    expect(invalid.status).toBe(400);
    const json = await invalid.json();
    expect(json.error).toBeTruthy();
    expect(json.issues.map((i: { path: string }) => i.path).sort()).toEqual(["cut", "value"]);
  });

  it("the server ends the run at threshold after the confirmation, and refuses a reading after the end with 409", async () => {
    const [run] = await runsOf(s.f, 0);
    const c = s.f.testers[0].client;
    for (const position of ["middle", "tip"]) expect((await post(c, s, run.id, { cut: 0, position, value: 160 })).status).toBe(201);
    await check(c, s, run.id, 2, 300);
    let state = await (await c.get(api(s.f.labId, run.id, "state"))).json();
    expect(state.decision.status).toBe("awaiting-check");
    expect(state.decision.nextCut).toBe(4);
    await check(c, s, run.id, 4, 420);
    state = await (await c.get(api(s.f.labId, run.id, "state"))).json();
    expect(state.decision.status).toBe("needs-confirmation");
    expect(state.state).toBe("in_progress");
    const conf = await post(c, s, run.id, { cut: 4, position: "fresh spot", kind: "confirmation", value: 430 });
    expect(conf.status).toBe(201);
    const answer = await conf.json();
    expect(answer.run.state).toBe("ended_threshold");
    expect(answer.run.decision.message).toMatch(/Ended at threshold at cut 4/);
    const [row] = await db().select({ state: runs.state, endCut: runs.endCut }).from(runs).where(eq(runs.id, run.id));
    expect(row).toEqual({ state: "ended_threshold", endCut: 4 });
    const after = await post(c, s, run.id, { cut: 6, position: "heel", value: 450 });
    expect(after.status).toBe(409);
    expect((await after.json()).error).toMatch(/finished/);
    // Corrections are closed too once the run has finished.
    const [first] = await db().select({ id: readings.id }).from(readings).where(eq(readings.runId, run.id)).limit(1);
    const late = await c.postJson(api(s.f.labId, run.id, "corrections"), { idempotencyKey: key(), readingId: first.id, value: 100, reason: "typo" });
    expect(late.status).toBe(409);
  });

  it("a correction is a new reading that supersedes the original, with its reason; both stay, and the audit log has it", async () => {
    const [, second] = await runsOf(s.f, 0);
    const c = s.f.testers[0].client;
    const res = await post(c, s, second.id, { cut: 0, position: "heel", value: 1550 });
    const original = (await res.json()).reading;
    const noReason = await c.postJson(api(s.f.labId, second.id, "corrections"), { idempotencyKey: key(), readingId: original.id, value: 155 });
    expect(noReason.status).toBe(400);
    const fix = await c.postJson(api(s.f.labId, second.id, "corrections"), { idempotencyKey: key(), readingId: original.id, value: 155, reason: "Typed an extra zero" });
    expect(fix.status).toBe(201);
    const corrected = (await fix.json()).reading;
    expect(corrected.supersedesId).toBe(original.id);
    const rows = await db().select().from(readings).where(eq(readings.runId, second.id)).orderBy(asc(readings.enteredAt));
    expect(rows.map((r) => [r.value, r.supersedesId, r.reason])).toEqual([
      [1550, null, null],
      [155, original.id, "Typed an extra zero"],
    ]);
    const audit = await db().select().from(auditEvents).where(and(eq(auditEvents.labId, s.f.labId), eq(auditEvents.action, "reading.corrected")));
    expect(audit).toHaveLength(1);
    expect(audit[0].details).toMatchObject({ from: 1550, to: 155, supersedesId: original.id, reason: "Typed an extra zero" });
    // The original cannot be corrected twice: the latest value is the one to correct.
    const twice = await c.postJson(api(s.f.labId, second.id, "corrections"), { idempotencyKey: key(), readingId: original.id, value: 156, reason: "again" });
    expect(twice.status).toBe(409);
  });

  it("records events at a cut and edge photos, served back only through the bench", async () => {
    const [, second] = await runsOf(s.f, 0);
    const c = s.f.testers[0].client;
    const upload = await c.request(api(s.f.labId, second.id, "photos"), { method: "POST", body: multipartWithFile("file", "edge.png", "image/png", new Uint8Array(TINY_PNG)) });
    expect(upload.status).toBe(200);
    const photo = await upload.json();
    expect(Object.keys(photo).sort()).toEqual(["byteSize", "contentType", "fileId", "url"]);
    const other = await c.postJson(api(s.f.labId, second.id, "events"), { idempotencyKey: key(), kind: "other", cut: 0, note: "" });
    expect(other.status).toBe(400);
    const ev = { idempotencyKey: key(), kind: "chip", cut: 0, note: "Small chip near the tip", photoFileId: photo.fileId };
    const saved = await c.postJson(api(s.f.labId, second.id, "events"), ev);
    expect(saved.status).toBe(201);
    expect((await c.postJson(api(s.f.labId, second.id, "events"), ev)).status).toBe(200);
    expect((await db().select().from(runEvents).where(and(eq(runEvents.runId, second.id), eq(runEvents.kind, "chip")))).length).toBe(1);
    const image = await c.get(photo.url);
    expect(image.status).toBe(200);
    expect(image.headers.get("content-type")).toBe("image/png");
    // Another tester of the lab cannot fetch it.
    expect((await s.f.testers[1].client.get(photo.url)).status).toBe(404);
  });

  it("a baseline at or above the threshold is a failed sharpening: an event, a new attempt, and re-sharpening before readings", async () => {
    const mine = await runsOf(s.f, 1);
    const run = mine[0];
    const c = s.f.testers[1].client;
    await startRun(s, c, run);
    await check(c, s, run.id, 0, 410);
    const [row] = await db().select({ attempt: runs.attempt, state: runs.state }).from(runs).where(eq(runs.id, run.id));
    expect(row).toEqual({ attempt: 2, state: "in_progress" });
    const events = await db().select().from(runEvents).where(and(eq(runEvents.runId, run.id), eq(runEvents.kind, "failed_sharpening")));
    expect(events).toHaveLength(1);
    const blocked = await post(c, s, run.id, { cut: 0, position: "heel", value: 150, attempt: 2 });
    expect(blocked.status).toBe(409);
    expect((await blocked.json()).error).toMatch(/re-sharpening/);
    const res = await c.post(runUrl(s.f.labId, run.id), { intent: "resharpen", sharpening: ["0", "1", "2"], safety: ["0", "1", "2", "3", "4", "5"] });
    expect(res.status).toBe(200);
    const stale = await post(c, s, run.id, { cut: 0, position: "heel", value: 150, attempt: 1 });
    expect(stale.status).toBe(409);
    expect((await post(c, s, run.id, { cut: 0, position: "heel", value: 150, attempt: 2 })).status).toBe(201);
  });

  it("CSV import with one bad row commits nothing; a clean file commits every row once", async () => {
    const mine = await runsOf(s.f, 1);
    const run = mine[1]; // started out of order above, no readings yet
    const c = s.f.testers[1].client;
    const before = await readingCount(run.id);
    const bad = "cut,position,kind,value_gf\n0,heel,check,150\n0,middle,check,abc\n0,tip,check,160\n";
    const preview = await c.postJson(api(s.f.labId, run.id, "import"), { csv: bad, commit: false });
    expect(preview.status).toBe(200);
    const p = await preview.json();
    expect(p.errors).toEqual([{ row: 3, column: "value_gf", message: '"abc" is not a number' }]);
    const commit = await c.postJson(api(s.f.labId, run.id, "import"), { csv: bad, commit: true });
    expect(commit.status).toBe(422);
    expect(await readingCount(run.id)).toBe(before);
    // A mapped export in N.
    const mapped = "Sample,Station,Force\n0,heel,1.5\n0,middle,1.6\n0,tip,1.4\n2,heel,2\n";
    const body = { csv: mapped, layout: "mapped", mapping: { cut: "Sample", position: "Station", value: "Force", kind: null, unit: "N" }, commit: true };
    const ok = await c.postJson(api(s.f.labId, run.id, "import"), body);
    expect(ok.status, await ok.clone().text()).toBe(200);
    expect((await ok.json()).saved).toBe(4);
    const rows = await db().select({ value: readings.value }).from(readings).where(eq(readings.runId, run.id)).orderBy(asc(readings.cut), asc(readings.position));
    expect(rows.map((r) => r.value)).toEqual([152.96, 163.15, 142.76, 203.94]);
    const again = await c.postJson(api(s.f.labId, run.id, "import"), body);
    expect(again.status).toBe(200);
    expect(await readingCount(run.id)).toBe(4);
  });

  it("a lead withdraws a run with a reason and reassigns a waiting run (a deviation on the record)", async () => {
    const mine = await runsOf(s.f, 0);
    const waiting = mine.filter((r) => r.state === "waiting");
    expect(waiting.length).toBeGreaterThanOrEqual(1);
    const lead = s.f.lead.client;
    const progress = `/labs/${s.f.labId}/studies/${s.f.studyId}/progress`;
    const [inProgress] = mine.filter((r) => r.state === "in_progress");
    const noReason = await lead.post(progress, { intent: "withdraw", runId: inProgress.id, reason: "" });
    expect(noReason.status).toBe(400);
    const noCategory = await lead.post(progress, { intent: "withdraw", runId: inProgress.id, reason: "Blade dropped and damaged" });
    expect(noCategory.status).toBe(400);
    const w = await lead.post(progress, { intent: "withdraw", runId: inProgress.id, category: "blade_damaged", reason: "Blade dropped and damaged" });
    expect(w.status).toBe(200);
    const [row] = await db().select({ state: runs.state, reason: runs.withdrawnReason, category: runs.withdrawnCategory }).from(runs).where(eq(runs.id, inProgress.id));
    expect(row).toEqual({ state: "withdrawn", reason: "Blade dropped and damaged", category: "blade_damaged" });
    expect((await post(s.f.testers[0].client, s, inProgress.id, { cut: 2, position: "heel", value: 200 })).status).toBe(409);

    const target = waiting[0];
    const r = await lead.post(progress, { intent: "reassign", runIds: [target.id], toTesterId: s.f.testers[1].id, category: "tester_unavailable", reason: "Tester one is away this week" });
    expect(r.status).toBe(200);
    const [moved] = await db().select({ testerId: runs.testerId }).from(runs).where(eq(runs.id, target.id));
    expect(moved.testerId).toBe(s.f.testers[1].id);
    const events = await db().select({ kind: runEvents.kind }).from(runEvents).where(eq(runEvents.runId, target.id));
    expect(events.map((e) => e.kind)).toEqual(["reassigned"]);
    const audit = await db().select().from(auditEvents).where(and(eq(auditEvents.objectId, target.id), eq(auditEvents.action, "run.reassigned")));
    expect(audit[0].details).toMatchObject({ deviation: true, toTesterId: s.f.testers[1].id });
    // The first tester no longer reaches it; the second does.
    expect((await s.f.testers[0].client.get(runUrl(s.f.labId, target.id))).status).toBe(404);
    expect((await s.f.testers[1].client.get(runUrl(s.f.labId, target.id))).status).toBe(200);
    // Testers cannot withdraw or reassign.
    expect((await s.f.testers[1].client.post(progress, { intent: "withdraw", runId: target.id, reason: "mine" })).status).toBe(403);
  });

  it("the progress JSON gives counts per tester and sitting, with no arm anywhere", async () => {
    const res = await s.f.lead.client.get(`/labs/${s.f.labId}/studies/${s.f.studyId}/progress.json`);
    expect(res.status).toBe(200);
    const text = await res.text();
    const json = JSON.parse(text);
    expect(json.total.done + json.total.inProgress + json.total.waiting + json.total.withdrawn).toBe(8);
    expect(json.total.withdrawn).toBe(1);
    for (const name of [...s.f.ids.armNames, ...s.f.ids.armDescriptions, ...s.f.armIds, "Arm A", "Arm B"]) expect(text).not.toContain(name);
    const asTester = await s.f.testers[0].client.get(`/labs/${s.f.labId}/studies/${s.f.studyId}/progress.json`);
    expect(asTester.status).toBe(403);
    expect(await asTester.json()).toMatchObject({ error: expect.any(String), issues: [] });
  });
});

describe("access to the bench", () => {
  let s: Setup;
  let b: Setup;
  beforeAll(async () => {
    [s, b] = await Promise.all([benchSetup(), benchSetup()]);
  });

  it("an analyst gets 403, another tester 404, another lab 404, signed out 401 for the API", async () => {
    const [run] = await runsOf(s.f, 0);
    expect((await s.f.analyst.client.get(runUrl(s.f.labId, run.id))).status).toBe(403);
    const analystApi = await s.f.analyst.client.postJson(api(s.f.labId, run.id, "readings"), { idempotencyKey: key(), cut: 0, position: "heel", value: 1 });
    expect(analystApi.status).toBe(403);
    expect(await analystApi.json()).toMatchObject({ error: expect.any(String), issues: [] });
    expect((await s.f.testers[1].client.get(runUrl(s.f.labId, run.id))).status).toBe(404);
    const otherApi = await s.f.testers[1].client.postJson(api(s.f.labId, run.id, "readings"), { idempotencyKey: key(), cut: 0, position: "heel", value: 1 });
    expect(otherApi.status).toBe(404);
    expect((await s.f.testers[1].client.get(api(s.f.labId, run.id, "state"))).status).toBe(404);
    // Lab B's tester with lab A's ids, and lab A's tester with lab B's run under lab A's id.
    expect((await b.f.testers[0].client.get(runUrl(s.f.labId, run.id))).status).toBe(404);
    const [bRun] = await runsOf(b.f, 0);
    expect((await s.f.testers[0].client.get(runUrl(s.f.labId, bRun.id))).status).toBe(404);
    expect((await s.f.testers[0].client.postJson(api(s.f.labId, bRun.id, "readings"), { idempotencyKey: key(), cut: 0, position: "heel", value: 1 })).status).toBe(404);
    expect((await b.f.lead.client.get(`/labs/${s.f.labId}/studies/${s.f.studyId}/progress`)).status).toBe(404);
    const anon = new (s.f.testers[0].client.constructor as new () => AppClient)();
    expect((await anon.postJson(api(s.f.labId, run.id, "readings"), { idempotencyKey: key(), cut: 0, position: "heel", value: 1 })).status).toBe(401);
    // A lead may look at a run but does not record at the bench.
    expect((await s.f.lead.client.get(runUrl(s.f.labId, run.id))).status).toBe(200);
    expect((await s.f.lead.client.postJson(api(s.f.labId, run.id, "readings"), { idempotencyKey: key(), cut: 0, position: "heel", value: 1 })).status).toBe(403);
  });

  it("readings are refused with 409 once the study is no longer running", async () => {
    const [run] = await runsOf(b.f, 0);
    await startRun(b, b.f.testers[0].client, run);
    await db().update(studies).set({ state: "closed", closedAt: new Date() }).where(eq(studies.id, b.f.studyId));
    const res = await post(b.f.testers[0].client, b, run.id, { cut: 0, position: "heel", value: 150 });
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/closed, not running/);
  });
});

describe("concurrent saves", () => {
  it("20 POSTs with distinct keys, each check's positions sent concurrently, store 20 readings in any order within a check", async () => {
    const s = await benchSetup({ cap: 40, checkEvery: 2, testers: 1 });
    const [run] = await runsOf(s.f, 0);
    await startRun(s, s.f.testers[0].client, run);
    const bodies = [];
    for (let cut = 0; bodies.length < 20; cut += 2) for (const position of ["heel", "middle", "tip"]) if (bodies.length < 20) bodies.push({ cut, position, value: 150 + cut });
    // The stop rule takes no reading beyond the check it waits for: a check's positions may race, checks follow one another.
    const answers: Response[] = [];
    for (let cut = 0; cut <= 12; cut += 2) answers.push(...(await Promise.all(bodies.filter((b) => b.cut === cut).map((b) => post(s.f.testers[0].client, s, run.id, b)))));
    expect(answers.map((a) => a.status)).toEqual(new Array(20).fill(201));
    expect(await readingCount(run.id)).toBe(20);
    const state = await (await s.f.testers[0].client.get(api(s.f.labId, run.id, "state"))).json();
    expect(state.decision.status).toBe("awaiting-check");
    expect(state.decision.nextCut).toBe(12);
    expect(state.decision.missingPositions).toEqual(["tip"]);
    // The same key 10 times at once: one row.
    const same = { idempotencyKey: key(), cut: 12, position: "tip", kind: "check", value: 170 };
    const repeats = await Promise.all(Array.from({ length: 10 }, () => s.f.testers[0].client.postJson(api(s.f.labId, run.id, "readings"), same)));
    expect(repeats.map((r) => r.status).sort()).toEqual([200, 200, 200, 200, 200, 200, 200, 200, 200, 201]);
    expect(await readingCount(run.id)).toBe(21);
  });
});

describe("a study with a preparer", () => {
  it("the tester confirms the preparer's recorded hand-over instead of ticking the sharpening; the preparer's list names conditions, the tester never sees it", async () => {
    const s = await benchSetup({ testers: 1 });
    await db().update(studies).set({ preparerId: s.f.lead.id }).where(eq(studies.id, s.f.studyId));
    const [run] = await runsOf(s.f, 0);
    const c = s.f.testers[0].client;
    const early = await c.post(runUrl(s.f.labId, run.id), startFields(s, run.code!, { sharpening: [], handOver: "on" }));
    expect(early.status).toBe(400);
    expect(await early.text()).toContain("The preparer has not recorded the hand-over");
    const prep = `/labs/${s.f.labId}/studies/${s.f.studyId}/preparation`;
    expect((await c.get(prep)).status).toBe(403);
    const page = await s.f.lead.client.get(prep);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(s.f.ids.armNames.some((n) => html.includes(n))).toBe(true);
    expect((await s.f.lead.client.post(prep, { runId: run.id })).status).toBe(200);
    const noTick = await c.post(runUrl(s.f.labId, run.id), startFields(s, run.code!, { sharpening: [] }));
    expect(noTick.status).toBe(400);
    await startRun(s, c, run, { sharpening: [], handOver: "on" });
    const runPage = await (await c.get(runUrl(s.f.labId, run.id))).text();
    expect(runPage).not.toContain("Sharpening steps");
  });
});

describe("blinding", () => {
  it("nothing a tester can reach carries an inventory number, steel, source, heat treatment, hardness, or an arm's name, description or id", async () => {
    const s = await benchSetup({ testers: 1, cap: 4, checkEvery: 2 });
    const { f } = s;
    const forbidden = [...f.ids.inventory, ...f.ids.steels, f.ids.sources, f.ids.heatTreatment, ...f.ids.armNames, ...f.ids.armDescriptions, f.ids.hardness, "63.7", ...f.armIds, ...f.bladeIds, "Arm A", "Arm B"];
    const c = f.testers[0].client;
    const seen: { what: string; text: string }[] = [];
    const grab = async (what: string, res: Response | Promise<Response>) => {
      const r = await res;
      const text = `${[...r.headers.entries()].map(([k, v]) => `${k}: ${v}`).join("\n")}\n${await r.text()}`;
      seen.push({ what, text });
      return { status: r.status, text };
    };
    const [run, second] = await runsOf(f, 0);
    await grab("queue", c.get("/bench"));
    await grab("queue data", c.get("/bench.data"));
    await grab("run page waiting", c.get(runUrl(f.labId, run.id)));
    await grab("run page data", c.get(`${runUrl(f.labId, run.id)}.data`));
    await grab("start refused", c.post(runUrl(f.labId, run.id), startFields(s, "AAAAAA")));
    await grab("start", c.post(runUrl(f.labId, run.id), startFields(s, run.code!)));
    await grab("state", c.get(api(f.labId, run.id, "state")));
    for (const [i, position] of ["heel", "middle", "tip"].entries()) await grab(`reading ${position}`, post(c, s, run.id, { cut: 0, position, value: 150 + i }));
    const readingsNow = await db().select({ id: readings.id }).from(readings).where(eq(readings.runId, run.id)).limit(1);
    await grab("correction", c.postJson(api(f.labId, run.id, "corrections"), { idempotencyKey: key(), readingId: readingsNow[0].id, value: 149, reason: "Misread the dial" }));
    const upload = await grab("photo upload", c.request(api(f.labId, run.id, "photos"), { method: "POST", body: multipartWithFile("file", "edge.png", "image/png", new Uint8Array(TINY_PNG)) }));
    const photo = JSON.parse(upload.text.slice(upload.text.indexOf("{")));
    await grab("event", c.postJson(api(f.labId, run.id, "events"), { idempotencyKey: key(), kind: "rolled_edge", cut: 0, note: "", photoFileId: photo.fileId }));
    await grab("photo", c.get(photo.url));
    await grab("import preview", c.postJson(api(f.labId, run.id, "import"), { csv: "cut,position,value_gf\n2,heel,300\n2,middle,x\n", commit: false }));
    await check(c, s, run.id, 2, 300);
    await grab("reading to the cap", post(c, s, run.id, { cut: 4, position: "heel", value: 350 }));
    await grab("reading to the cap", post(c, s, run.id, { cut: 4, position: "middle", value: 350 }));
    await grab("reading ends run", post(c, s, run.id, { cut: 4, position: "tip", value: 350 }));
    await grab("after the end", post(c, s, run.id, { cut: 4, position: "tip", value: 350 }));
    await grab("run page ended", c.get(runUrl(f.labId, run.id)));
    await grab("run page second", c.get(runUrl(f.labId, second.id)));
    await grab("not found", c.get(runUrl(f.labId, "00000000-0000-4000-8000-000000000000")));
    await grab("queue after", c.get("/bench"));
    await grab("lab home", c.get(`/labs/${f.labId}`));
    // Every grab reached what it meant to (no sign-in redirects standing in for pages).
    expect(seen.find((x) => x.what === "state")!.text).toContain('"decision"');
    for (const what of ["queue", "run page waiting", "run page data", "run page ended"]) expect(seen.find((x) => x.what === what)!.text).toContain(formatBlindCode(run.code!).slice(0, 3));
    const [ended] = await db().select({ state: runs.state }).from(runs).where(eq(runs.id, run.id));
    expect(ended.state).toBe("censored");
    expect(seen.length).toBeGreaterThan(20);
    for (const { what, text } of seen) {
      for (const s of forbidden) {
        if (text.includes(s)) throw new Error(`${what} contains the blinded string ${s}`);
      }
    }
    // The check can fail: the lead's preparation page (not blind) does name the arms.
    const lead = await (await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}/preparation`)).text();
    expect(lead).toContain("Preparation");
  });
});
