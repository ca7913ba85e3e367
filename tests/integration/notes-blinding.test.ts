// Lead notes, ended-run withdrawals, seed concealment and the per-arm flow, through the
// real build: what a blinded analyst can reach, what an owner must approve, and what the
// study page, report and bundle say about the randomization.
import { afterAll, describe, expect, it } from "vitest";
import { asc, eq } from "drizzle-orm";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import { crawl, findLeaks } from "../support/crawler.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { randomizationRolls, runEvents, runs, studies } from "~/server/db/schema/index.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { startStudyTx } from "~/server/studies/randomize.server.ts";
import { BundleSchema } from "~/domain/bundle.ts";
import { formatDateTime } from "~/lib/dates.ts";

afterAll(closeDb);

const protocol = { threshold: 400, confirm: true, cap: 6, checkEvery: 2, aggregation: "mean" as const, positions: ["heel", "middle", "tip"] };

/** Runs the given runs through the simulator (arm 0 dulls slowly, arm 1 fast). */
async function simulate(f: StudyFixture, runIds: string[]) {
  await db().transaction(async (tx) => {
    const rows = await tx.select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
    for (const run of rows.filter((r) => runIds.includes(r.id))) {
      await recordSimulatedRun(tx, {
        labId: f.labId, runId: run.id, testerId: run.testerId, protocol, seed: `notes-test/${run.schedulePosition}`, startAt: new Date(Date.now() - 3600_000),
        model: { baselineMeanGf: 150, baselineSdGf: 10, lossRatePerCut: run.armId === f.armIds[0] ? 30 : 70, curvature: 0, noiseSdGf: 8 },
      });
    }
  });
}

const runRows = (f: StudyFixture) => db().select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
const progressUrl = (f: StudyFixture) => `/labs/${f.labId}/studies/${f.studyId}/progress`;
const exportsOf = (f: StudyFixture) => [
  `/labs/${f.labId}/results`,
  `/labs/${f.labId}/studies/${f.studyId}/results`,
  `/labs/${f.labId}/studies/${f.studyId}/results.data`,
  `/labs/${f.labId}/studies/${f.studyId}/results?_data=routes%2Fresults%2Fstudy-results`,
  `/labs/${f.labId}/studies/${f.studyId}/report`,
  `/labs/${f.labId}/studies/${f.studyId}/report.data`,
  `/labs/${f.labId}/api/studies/${f.studyId}/analysis.json`,
  `/labs/${f.labId}/api/studies/${f.studyId}/readings.csv`,
  `/labs/${f.labId}/api/studies/${f.studyId}/outcomes.csv`,
  `/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`,
];

async function fetchAll(f: StudyFixture, urls: string[]) {
  const out: { url: string; status: number; body: string }[] = [];
  for (const url of urls) {
    const r = await f.analyst.client.get(url);
    out.push({ url, status: r.status, body: await r.text() });
  }
  return out;
}

describe("lead notes and blinded readers", () => {
  it("15.1 a withdrawal note naming a steel reaches no route or export an analyst can reach before unblinding; after unblinding it appears", async () => {
    const f = await createStudyFixture({ testers: 2, replicates: 1 });
    const withdrawNote = `Dropped the ${f.ids.steels[0]} blade on the floor, tip bent NoteW${f.tag}`;
    const reassignNote = `Tester 1 knows the ${f.ids.steels[1]} blades by sight NoteR${f.tag}`;
    const rows = await runRows(f);
    const [toReassign, toWithdraw] = rows.filter((r) => r.testerId === f.testers[0].id);
    expect(toWithdraw).toBeTruthy();
    const lead = f.lead.client;
    expect((await lead.post(progressUrl(f), { intent: "reassign", runIds: [toReassign.id], toTesterId: f.testers[1].id, category: "tester_unavailable", reason: reassignNote })).status).toBe(200);
    expect((await lead.post(progressUrl(f), { intent: "withdraw", runId: toWithdraw.id, category: "blade_damaged", reason: withdrawNote })).status).toBe(200);
    await simulate(f, rows.filter((r) => r.id !== toWithdraw.id).map((r) => r.id));
    expect((await lead.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);

    // Every part of the notes a blinded reader must not see: the whole notes, their steels and their tokens.
    const secrets = [withdrawNote, reassignNote, f.ids.steels[0], f.ids.steels[1], `NoteW${f.tag}`, `NoteR${f.tag}`, "floor, tip bent", "knows the"];
    const crawled = await crawl(f.analyst.client, [`/labs/${f.labId}`, `/labs/${f.labId}/results`], { extraParams: { labId: [f.labId], studyId: [f.studyId] } });
    const direct = await fetchAll(f, exportsOf(f));
    for (const p of direct) expect(p.status, p.url).toBe(200);
    const ofStudy = [...crawled, ...direct].filter((p) => p.url.includes(f.studyId) && p.status === 200);
    expect(ofStudy.length).toBeGreaterThanOrEqual(8);
    expect(findLeaks([...crawled, ...direct], secrets)).toEqual([]);

    // The category is what blinded readers get.
    const bundle = BundleSchema.parse(JSON.parse(direct.find((p) => p.url.endsWith("bundle.json"))!.body));
    const withdrawn = bundle.raw.runs.find((r) => r.state === "withdrawn")!;
    expect(withdrawn).toMatchObject({ withdrawnCategory: "blade_damaged", withdrawnNote: null });
    const reassigned = bundle.raw.events.find((e) => e.kind === "reassigned")!;
    expect(reassigned).toMatchObject({ category: "tester_unavailable", note: null, noteWithheld: true });
    const report = direct.find((p) => p.url.endsWith("/report"))!.body;
    expect(report).toContain("Blade damaged");
    expect(report).toContain("hidden until the study is unblinded");
    expect(direct.find((p) => p.url.endsWith("outcomes.csv"))!.body).toContain("blade_damaged");

    // After unblinding the notes appear, and the report says they were hidden until then.
    expect((await lead.post(`/labs/${f.labId}/studies/${f.studyId}/results/unblind`, { confirm: "unblind" })).status).toBe(302);
    const after = await fetchAll(f, exportsOf(f));
    const body = (suffix: string) => after.find((p) => p.url.endsWith(suffix))!.body;
    expect(body("/report")).toContain(withdrawNote);
    expect(body("/report")).toContain("hidden from blinded readers until unblinding");
    expect(body("outcomes.csv")).toContain(withdrawNote);
    const unblindedBundle = BundleSchema.parse(JSON.parse(body("bundle.json")));
    expect(unblindedBundle.raw.runs.find((r) => r.state === "withdrawn")!.withdrawnNote).toBe(withdrawNote);
    expect(unblindedBundle.raw.events.find((e) => e.kind === "reassigned")!.note).toContain(reassignNote);
    // The stored analysis never held the note: it is hashed at closing with categories only.
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(JSON.stringify(study.blindedSnapshot)).not.toContain(`NoteW${f.tag}`);
  });

  it("15.1 testers' own event notes stay as they are; a lead's event note waits for unblinding", async () => {
    const f = await createStudyFixture({ replicates: 1 });
    const rows = await runRows(f);
    await simulate(f, rows.map((r) => r.id));
    // A note by the run's tester and one by the lead on the same run (written as the bench and the lead would).
    await db().insert(runEvents).values([
      { labId: f.labId, runId: rows[0].id, kind: "chip", note: `Small chip at the heel TesterNote${f.tag}`, enteredBy: rows[0].testerId },
      { labId: f.labId, runId: rows[0].id, kind: "deviation", category: "protocol_deviation", note: `Lead saw ${f.ids.steels[0]} on it LeadNote${f.tag}`, enteredBy: f.lead.id },
    ]);
    // The study is still running: the events are accepted.
    const events = await db().select().from(runEvents).where(eq(runEvents.runId, rows[0].id));
    expect(events.some((e) => e.note.includes(`LeadNote${f.tag}`))).toBe(true);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const pages = await fetchAll(f, exportsOf(f));
    expect(findLeaks(pages, [`LeadNote${f.tag}`, f.ids.steels[0]])).toEqual([]);
    const bundle = BundleSchema.parse(JSON.parse(pages.find((p) => p.url.endsWith("bundle.json"))!.body));
    expect(bundle.raw.events.find((e) => e.kind === "chip")!.note).toContain(`TesterNote${f.tag}`);
    expect(bundle.raw.events.find((e) => e.kind === "deviation")).toMatchObject({ category: "protocol_deviation", note: null });
    expect(pages.find((p) => p.url.endsWith("/report"))!.body).toContain("note hidden until unblinding");
  });
});

describe("withdrawing a run that has ended", () => {
  it("15.11 a lead cannot withdraw an ended run; an owner can, and the report lists it under its own heading", async () => {
    const f = await createStudyFixture({ replicates: 1 });
    const rows = await runRows(f);
    await simulate(f, rows.map((r) => r.id));
    const ended = (await runRows(f)).find((r) => r.state === "ended_threshold" || r.state === "censored")!;
    expect(ended).toBeTruthy();
    const refused = await f.lead.client.post(progressUrl(f), { intent: "withdraw", runId: ended.id, category: "instrument_fault", reason: "Second thoughts about this run" });
    expect(refused.status).toBe(403);
    expect(await refused.text()).toContain("only an owner");
    expect((await runRows(f)).find((r) => r.id === ended.id)!.state).toBe(ended.state);
    const allowed = await f.owner.client.post(progressUrl(f), { intent: "withdraw", runId: ended.id, category: "instrument_fault", reason: "The tester's load cell was found out of calibration" });
    expect(allowed.status).toBe(200);
    const [row] = await db().select().from(runs).where(eq(runs.id, ended.id));
    expect(row).toMatchObject({ state: "withdrawn", withdrawnCategory: "instrument_fault", withdrawnFromState: ended.state });
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const report = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/report`)).text();
    expect(report).toContain("Withdrawals of ended runs");
    const section = report.slice(report.indexOf("ended-run-withdrawals"));
    expect(section).toContain(`Run ${ended.schedulePosition} `);
    expect(section).toContain("Instrument fault");
    // Before unblinding the owner's note stays hidden there too.
    expect(report).not.toContain("load cell");
    const bundle = BundleSchema.parse(await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`)).json());
    expect(bundle.raw.runs.find((r) => r.runId === ended.id)!.withdrawnFromState).toBe(ended.state);
  });
});

describe("allocation concealment", () => {
  it("15 allocation concealment: the server draws the seed by default, a typed seed is marked, and the study page, report and bundle count the earlier rolls with their times", async () => {
    const f = await createStudyFixture({ state: "draft", replicates: 1 });
    const randomize = `/labs/${f.labId}/studies/${f.studyId}/randomize`;
    const page = await (await f.lead.client.get(randomize)).text();
    // No seed is offered in the form: nothing to keep or swap for a better-looking one.
    expect(page).not.toMatch(/name="seed"[^>]*value="[^"]+"/);
    expect((await f.lead.client.post(randomize, { seed: "" })).status).toBe(302);
    let [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study.seedSource).toBe("server");
    expect(study.seed).toMatch(/^[0-9a-f]{32}$/);
    const firstSeed = study.seed;
    expect((await f.lead.client.post(randomize, { seed: "" })).status).toBe(302);
    [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study.seed).not.toBe(firstSeed);
    expect((await f.lead.client.post(randomize, { seed: "published seed 7" })).status).toBe(302);
    [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study).toMatchObject({ seed: "published seed 7", seedSource: "typed" });
    const rolls = await db().select().from(randomizationRolls).where(eq(randomizationRolls.studyId, f.studyId)).orderBy(asc(randomizationRolls.rolledAt));
    expect(rolls.map((r) => r.seedSource)).toEqual(["server", "server", "typed"]);

    const studyPage = await (await f.lead.client.get(`/labs/${f.labId}/studies/${f.studyId}`)).text();
    expect(studyPage).toContain("typed by the lead");
    expect(studyPage).toMatch(/data-testid="earlier-rolls">2: /);
    // Shown in the lab's time zone (UTC for a new lab), the zone named.
    expect(studyPage).toContain(formatDateTime(rolls[0].rolledAt, "UTC"));

    await db().transaction((tx) => startStudyTx(tx, f.lead.id, f.labId, f.studyId));
    await simulate(f, (await runRows(f)).map((r) => r.id));
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const report = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/report`)).text();
    expect(report).toContain("2 roll(s) before the final one");
    expect(report).toContain("typed by the lead");
    const bundle = BundleSchema.parse(await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`)).json());
    expect(bundle.raw.randomization.seedSource).toBe("typed");
    expect(bundle.raw.randomization.earlierRolls.map((r) => r.rolledAt)).toEqual(rolls.slice(0, 2).map((r) => r.rolledAt.toISOString()));
    // Reproducible: the same design, seed and version give the same schedule hash.
    expect(rolls[2].scheduleHash).toBe(study.scheduleHash);
  });
});

describe("flow of blades and runs per arm", () => {
  it("16.6 the results page and report show the flow per arm under neutral labels, with withdrawal categories and a flow diagram", async () => {
    const f = await createStudyFixture({ replicates: 2 });
    const rows = await runRows(f);
    const withdrawn = rows.find((r) => r.state === "waiting")!;
    expect((await f.lead.client.post(progressUrl(f), { intent: "withdraw", runId: withdrawn.id, category: "medium_fault", reason: `Rope frayed NoteF${f.tag}` })).status).toBe(200);
    await simulate(f, rows.filter((r) => r.id !== withdrawn.id).map((r) => r.id));
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const results = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/results`)).text();
    const table = results.slice(results.indexOf('data-testid="flow-per-arm"'), results.indexOf("</table>", results.indexOf('data-testid="flow-per-arm"')));
    expect(table).toContain("Arm A");
    expect(table).toContain("Arm B");
    expect(table).toContain("Test medium fault: 1");
    expect(table).toContain("Runs analysed");
    for (const secret of [...f.ids.armNames, `NoteF${f.tag}`]) expect(results).not.toContain(secret);
    const report = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/report`)).text();
    const diagram = report.slice(report.indexOf('data-testid="flow-diagram"'), report.indexOf("</figure>", report.indexOf('data-testid="flow-diagram"')));
    expect(diagram).toContain("Blades enrolled: 4");
    expect(diagram).toMatch(/2 blades allocated to it, 4 runs scheduled/);
    expect(diagram).toContain("Runs completed:");
    expect(diagram).toContain("Analysed:");
    expect(diagram).toContain("<svg");
    for (const secret of f.ids.armNames) expect(report).not.toContain(secret);
    // Per arm, the counts add up: scheduled = completed + withdrawn (+ left out).
    const json = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/results.data`)).text();
    expect(json).toContain("perArm");
  });
});
