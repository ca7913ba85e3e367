// The stop rule cannot be bent: through the real build and the real database, every path
// that writes readings (a new reading, a correction, the CSV import) passes the one gate in
// the core, and the numbers it takes are finite and inside the instrument's range.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import { and, asc, eq } from "drizzle-orm";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import type { AppClient } from "../support/app-client.ts";
import { modelDecision, plausibleSteps, protocolArb, type Step } from "../support/stop-rule-model.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { protocolVersions, readings, runs, studyBlades } from "~/server/db/schema/index.ts";
import { createInstrument, createLot, createMedium } from "~/server/library.server.ts";
import { correctReading, saveReading } from "~/server/bench/readings.server.ts";
import { BenchError } from "~/server/bench/api.server.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";
import { toForceProtocol } from "~/domain/protocol.ts";
import type { ReadingCandidate } from "~/domain/outcomes.ts";

afterAll(closeDb);

type Bench = { f: StudyFixture; lotId: string; instrumentId: string };

async function benchFor(f: StudyFixture, kind: "sharpness_tester" | "card_machine", maxReading: number | null): Promise<Bench> {
  const medium = await createMedium(f.labId, f.lead.id, { name: "Fixture rope", kind: "rope", material: "manila", sizeMm: 10, notes: "" });
  const lot = await createLot(f.labId, f.lead.id, medium.id, { lotCode: "LOT-1", receivedOn: "2024-01-10", conditioning: "" });
  const instrument = await createInstrument(f.labId, f.lead.id, { name: `Instrument ${kind}`, kind, testMedium: "test wire", resolution: 1, maxReading: maxReading ?? undefined, calibrationIntervalDays: 365 });
  return { f, lotId: lot.id, instrumentId: instrument.id };
}

async function runsOf(f: StudyFixture) {
  return db()
    .select({ id: runs.id, code: studyBlades.blindCode })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .where(and(eq(runs.studyId, f.studyId), eq(runs.testerId, f.testers[0].id)))
    .orderBy(asc(runs.schedulePosition));
}

async function start(b: Bench, run: { id: string; code: string | null }, first: boolean) {
  const fields = { intent: "start", blindCode: formatBlindCode(run.code!), sharpening: ["0", "1", "2"], safety: ["0", "1", "2", "3", "4", "5", "6"], mediaLotId: b.lotId, instrumentId: b.instrumentId, roomTempC: "21", humidityPct: "50", ...(first ? {} : { reason: "Fixture order for the test" }) };
  const res = await b.f.testers[0].client.post(`/labs/${b.f.labId}/bench/runs/${run.id}`, fields);
  expect(res.status, (await res.text()).slice(0, 300)).toBe(200);
}

let counter = 0;
const key = () => `key-${Date.now()}-${++counter}`;
const api = (b: Bench, runId: string, what: string) => `/labs/${b.f.labId}/api/runs/${runId}/${what}`;
const post = (c: AppClient, b: Bench, runId: string, body: Record<string, unknown>) => c.postJson(api(b, runId, "readings"), { idempotencyKey: key(), kind: "check", ...body });

async function check(c: AppClient, b: Bench, runId: string, cut: number, value: number) {
  for (const position of ["heel", "middle", "tip"]) expect((await post(c, b, runId, { cut, position, value })).status).toBe(201);
}

const runRow = async (id: string) => (await db().select({ state: runs.state, endCut: runs.endCut }).from(runs).where(eq(runs.id, id)))[0];

describe("15.4 the stop rule through the API", () => {
  let b: Bench;
  let list: { id: string; code: string | null }[];
  beforeAll(async () => {
    const f = await createStudyFixture({ cap: 6, checkEvery: 2, replicates: 2 });
    b = await benchFor(f, "sharpness_tester", 2000);
    list = await runsOf(f);
    for (const [i, r] of list.entries()) await start(b, r, i === 0);
  });

  it("15.4 while a confirmation is pending, every other reading is a 409 that says so, and the real ending still works", async () => {
    const c = b.f.testers[0].client;
    const run = list[0];
    await check(c, b, run.id, 0, 150);
    await check(c, b, run.id, 2, 420);
    const early = await post(c, b, run.id, { cut: 4, position: "heel", value: 300 });
    expect(early.status).toBe(409);
    expect((await early.json()).error).toMatch(/only reading the run takes now is its confirmation at a fresh spot \(cut 2\)/);
    const far = await post(c, b, run.id, { cut: 6, position: "heel", value: 300 });
    expect(far.status).toBe(409);
    expect((await db().select().from(readings).where(eq(readings.runId, run.id))).length).toBe(6);
    const conf = await post(c, b, run.id, { cut: 2, position: "fresh spot", kind: "confirmation", value: 430 });
    expect(conf.status).toBe(201);
    expect(await runRow(run.id)).toEqual({ state: "ended_threshold", endCut: 2 });
  });

  it("15.4 no reading is accepted for a cut beyond the next check the schedule allows", async () => {
    const c = b.f.testers[0].client;
    const run = list[1];
    await check(c, b, run.id, 0, 150);
    const ahead = await post(c, b, run.id, { cut: 4, position: "heel", value: 200 });
    expect(ahead.status).toBe(409);
    expect((await ahead.json()).error).toMatch(/waits for the check at cut 2 \(heel, middle, tip\)/);
    const orphan = await post(c, b, run.id, { cut: 2, position: "fresh spot", kind: "confirmation", value: 450 });
    expect(orphan.status).toBe(409);
    expect((await post(c, b, run.id, { cut: 2, position: "heel", value: 200 })).status).toBe(201);
  });

  it("15.4 a correction cannot change a reading's cut or kind", async () => {
    const c = b.f.testers[0].client;
    const run = list[1];
    const [first] = await db().select({ id: readings.id }).from(readings).where(and(eq(readings.runId, run.id), eq(readings.cut, 0), eq(readings.position, "heel")));
    for (const move of [{ cut: 2 }, { kind: "confirmation" }]) {
      const res = await c.postJson(api(b, run.id, "corrections"), { idempotencyKey: key(), readingId: first.id, value: 140, reason: "Move it", ...move });
      expect(res.status).toBe(400);
      expect((await res.json()).error).toMatch(/keeps the reading's cut, position and kind/);
    }
    const ok = await c.postJson(api(b, run.id, "corrections"), { idempotencyKey: key(), readingId: first.id, value: 140, reason: "Misread the dial", cut: 0 });
    expect(ok.status).toBe(201);
    expect((await ok.json()).reading).toMatchObject({ cut: 0, position: "heel", kind: "check", value: 140 });
  });

  it("15.4 the CSV import follows the same rule: rows past a pending confirmation or beyond the next check are row errors, nothing is stored", async () => {
    const c = b.f.testers[0].client;
    const run = list[2];
    const pending = "cut,position,kind,value_gf\n0,heel,check,150\n0,middle,check,150\n0,tip,check,150\n2,heel,check,420\n2,middle,check,420\n2,tip,check,420\n4,heel,check,300\n2,fresh,confirmation,430\n";
    const res = await c.postJson(api(b, run.id, "import"), { csv: pending, commit: true });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.issues.map((i: { path: string }) => i.path)).toEqual(["row 8"]);
    expect(body.issues[0].message).toMatch(/only reading the run takes now is its confirmation/);
    const ahead = "cut,position,kind,value_gf\n0,heel,check,150\n0,middle,check,150\n4,tip,check,150\n";
    const res2 = await c.postJson(api(b, run.id, "import"), { csv: ahead, commit: true });
    expect(res2.status).toBe(422);
    expect((await db().select().from(readings).where(eq(readings.runId, run.id))).length).toBe(0);
  });
});

describe("15.8 the instrument's range, on every reading", () => {
  it("15.8 a corrected confirmation above the instrument's maximum is refused and does not end the run; the run's own instrument's lower maximum holds too", async () => {
    const f = await createStudyFixture({ cap: 6, checkEvery: 2 });
    const b = await benchFor(f, "sharpness_tester", 1500);
    const [run] = await runsOf(f);
    await start(b, run, true);
    const c = f.testers[0].client;
    await check(c, b, run.id, 0, 150);
    await check(c, b, run.id, 2, 420);
    const conf = await post(c, b, run.id, { cut: 2, position: "fresh spot", kind: "confirmation", value: 300 });
    expect(conf.status).toBe(201);
    const confId = (await conf.json()).reading.id;
    const huge = await c.postJson(api(b, run.id, "corrections"), { idempotencyKey: key(), readingId: confId, value: 50_000, reason: "Bigger" });
    expect(huge.status).toBe(400);
    expect((await huge.json()).error).toMatch(/above .*maximum/);
    expect((await runRow(run.id)).state).toBe("in_progress");
    // 1600 gf is inside the protocol's 2000 gf but above this instrument's 1500 gf.
    const over = await post(c, b, run.id, { cut: 4, position: "heel", value: 1600 });
    expect(over.status).toBe(400);
    expect((await over.json()).error).toMatch(/1600 gf is above this run's sharpness tester's maximum of 1500 gf/);
  });
});

describe("15.9 finite numbers inside the physical range", () => {
  it("15.9 imported edge-force values with hundreds of digits are row errors, not a 500", async () => {
    const f = await createStudyFixture({ cap: 6, checkEvery: 2 });
    const b = await benchFor(f, "sharpness_tester", 2000);
    const [run] = await runsOf(f);
    await start(b, run, true);
    const c = f.testers[0].client;
    for (const digits of [40, 320, 400]) {
      const big = "9".repeat(digits);
      const res = await c.postJson(api(b, run.id, "import"), { csv: `cut,position,kind,value_gf\n0,heel,check,${big}\n0,middle,check,150\n0,tip,check,150\n`, commit: true });
      expect(res.status, await res.clone().text()).toBe(422);
      expect((await res.json()).issues[0].message).toMatch(/beyond any instrument's range|above the sharpness tester's maximum/);
      const inN = await c.postJson(api(b, run.id, "import"), { csv: `Cut,Pos,F\n0,heel,${big}\n`, layout: "mapped", mapping: { cut: "Cut", position: "Pos", value: "F", kind: null, unit: "N" }, commit: false });
      expect(inN.status).toBe(200);
      expect((await inN.json()).errors.length).toBe(1);
    }
    expect((await db().select().from(readings).where(eq(readings.runId, run.id))).length).toBe(0);
  });

  it("15.9 card depth: 99,999 mm per stroke through the API and Infinity through the import are refused", async () => {
    const f = await createStudyFixture({ template: "card", strokes: 4 });
    const b = await benchFor(f, "card_machine", null);
    const [run] = await runsOf(f);
    await start(b, run, true);
    const c = f.testers[0].client;
    const big = await post(c, b, run.id, { cut: 1, position: "depth", value: 99_999 });
    expect(big.status).toBe(400);
    expect((await big.json()).error).toMatch(/99999 mm is above/);
    const inf = await c.postJson(api(b, run.id, "import"), { csv: `stroke,depth_mm\n1,${"9".repeat(400)}\n`, commit: true });
    expect(inf.status).toBe(422);
    expect((await db().select().from(readings).where(eq(readings.runId, run.id))).length).toBe(0);
    expect((await post(c, b, run.id, { cut: 1, position: "depth", value: 18.5 })).status).toBe(201);
    expect((await post(c, b, run.id, { cut: 3, position: "depth", value: 12 })).status).toBe(409);
  });
});

describe("15.4 property through the server and the database", () => {
  it("15.4 random sequences of readings (valid and invalid, any order, with retries) never end a run other than where the rule applied to the stored readings in order ends it", async () => {
    const f = await createStudyFixture({ cap: 8, checkEvery: 1, replicates: 10 });
    await benchFor(f, "sharpness_tester", 2000);
    const pool = await runsOf(f);
    // Runs started directly: the setup form is tested elsewhere; each case gets a fresh run.
    await db().update(runs).set({ state: "in_progress", startedAt: new Date(), checklist: { setupAttempt: 1, attempts: [] } }).where(eq(runs.studyId, f.studyId));
    const [version] = await db().select({ content: protocolVersions.content }).from(protocolVersions).where(eq(protocolVersions.id, f.protocolVersionId));
    const stored = toForceProtocol(version.content)!;
    let next = 0;
    await fc.assert(
      fc.asyncProperty(plausibleSteps(stored), async (steps: Step[]) => {
        const runId = pool[next++ % pool.length].id;
        const ctx = { labId: f.labId, runId, userId: f.testers[0].id };
        const sent: { kind: "reading" | "correction"; body: Record<string, unknown> }[] = [];
        const acceptedIds: string[] = [];
        for (const s of steps) {
          let call: { kind: "reading" | "correction"; body: Record<string, unknown> } | null = null;
          if (s.op === "new") call = { kind: "reading", body: { idempotencyKey: key(), cut: s.cut, position: s.position, kind: s.kind, value: s.value } };
          else if (s.op === "retry") call = sent.length ? sent[s.step % sent.length] : null;
          else if (acceptedIds.length) call = { kind: "correction", body: { idempotencyKey: key(), readingId: acceptedIds[s.target % acceptedIds.length], value: s.value, reason: "Property test", ...(s.move ?? {}) } };
          if (!call) continue;
          sent.push(call);
          try {
            // Values the JSON body could not carry (NaN, Infinity) are a 400 at the route; skip them here.
            if (!Number.isFinite(call.body.value as number)) continue;
            const r = call.kind === "reading" ? await saveReading(ctx, call.body as never) : await correctReading(ctx, call.body as never);
            if (!r.replay) acceptedIds.push(r.reading.id);
          } catch (error) {
            if (!(error instanceof BenchError)) throw error;
            expect(error.status === 400 || error.status === 404 || error.status === 409).toBe(true);
          }
        }
        const [row] = await db().select({ state: runs.state, endCut: runs.endCut, attempt: runs.attempt }).from(runs).where(eq(runs.id, runId));
        const rows = await db().select().from(readings).where(eq(readings.runId, runId)).orderBy(asc(readings.runSeq));
        const firstAttempt: ReadingCandidate[] = rows.filter((r) => r.attempt === 1).map((r) => ({ id: r.id, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedes: r.supersedesId }));
        expect(rows.every((r) => r.attempt === 1)).toBe(true);
        // No reading accepted: the run has not moved. (No `return expect(...)`: fast-check counts any
        // returned value other than undefined or true as a failure.)
        if (firstAttempt.length === 0) {
          expect(row.state).toBe("in_progress");
          return;
        }
        const model = modelDecision(stored, firstAttempt);
        const expected =
          model.status === "ended-at-threshold" ? { state: "ended_threshold", endCut: model.cut, attempt: 1 }
          : model.status === "censored" ? { state: "censored", endCut: model.cut, attempt: 1 }
          : model.status === "failed-sharpening" ? { state: "in_progress", endCut: null, attempt: 2 }
          : { state: "in_progress", endCut: null, attempt: 1 };
        expect(row).toEqual(expected);
      }),
      { numRuns: 40 },
    );
  }, 120_000);
});
