import { afterAll, describe, expect, inject, it } from "vitest";
import { asc, eq, sql } from "drizzle-orm";
import { writeFileSync, mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { spawnSync } from "node:child_process";
import { Ajv2020 } from "ajv/dist/2020.js";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import { waitForMail } from "../support/mail.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { runs, studies } from "~/server/db/schema/index.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { bundleJsonSchema } from "../../scripts/bundle-schema.ts";
import { reanalyze } from "../../scripts/reanalyze.ts";
import { readFileSync } from "node:fs";
import Papa from "papaparse";
import * as ss from "simple-statistics";

afterAll(closeDb);

const protocol = { threshold: 400, confirm: true, cap: 6, checkEvery: 2, aggregation: "mean" as const, positions: ["heel", "middle", "tip"] };

/** Runs every run of a fixture study through the simulator: arm 0 dulls slowly, arm 1 fast. */
async function finishAllRuns(f: StudyFixture, cap = 6) {
  await db().transaction(async (tx) => {
    const rows = await tx.select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
    for (const run of rows) {
      const slow = run.armId === f.armIds[0];
      await recordSimulatedRun(tx, {
        labId: f.labId, runId: run.id, testerId: run.testerId, protocol: { ...protocol, cap }, seed: `results-test/${run.schedulePosition}`, startAt: new Date(Date.now() - 3600_000),
        model: { baselineMeanGf: 150, baselineSdGf: 10, lossRatePerCut: slow ? 30 : 70, curvature: 0, noiseSdGf: 8 },
      });
    }
  });
}

function leaks(text: string, f: StudyFixture) {
  const all = [...f.ids.inventory, ...f.ids.steels, f.ids.sources, f.ids.heatTreatment, ...f.ids.armNames, ...f.ids.armDescriptions, f.ids.hardness];
  return all.filter((s) => text.includes(s));
}

describe("closing, results and unblinding", () => {
  it("refuses to close while runs are open, then closes with a hashed blinded snapshot and mails the analyst", async () => {
    const f = await createStudyFixture({ replicates: 2 });
    const results = `/labs/${f.labId}/studies/${f.studyId}/results`;
    const early = await f.lead.client.post(results, { intent: "close" });
    expect(early.status).toBe(409);
    expect(await early.text()).toContain("have not ended");

    await finishAllRuns(f);
    const closed = await f.lead.client.post(results, { intent: "close" });
    expect(closed.status).toBe(302);
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study.state).toBe("closed");
    expect(study.snapshotHash).toMatch(/^[0-9a-f]{64}$/);
    const mail = await waitForMail(inject("mailDir"), f.analyst.email, /Study closed/);
    expect(leaks(mail.text + mail.html, f)).toEqual([]);

    // The database refuses new readings and run changes for a closed study.
    const [run] = await db().select().from(runs).where(eq(runs.studyId, f.studyId)).limit(1);
    await expect(
      db().execute(sql`INSERT INTO readings (lab_id, run_id, attempt, cut, position, value, idempotency_key, content_hash, entered_by)
        VALUES (${f.labId}, ${run.id}, 1, 2, 'heel', 120, 'late', 'h', ${f.testers[0].id})`),
    ).rejects.toMatchObject({ cause: { code: "BC409" } });
    await expect(db().execute(sql`UPDATE runs SET state = 'withdrawn', withdrawn_reason = 'x' WHERE id = ${run.id}`)).rejects.toMatchObject({ cause: { code: "BC409" } });
  });

  it("before unblinding, nothing an analyst can reach names an arm, steel or blade; after unblinding the names appear", async () => {
    const f = await createStudyFixture({ replicates: 2 });
    await finishAllRuns(f);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const urls = [
      `/labs/${f.labId}/results`,
      `/labs/${f.labId}/studies/${f.studyId}/results`,
      `/labs/${f.labId}/studies/${f.studyId}/report`,
      `/labs/${f.labId}/api/studies/${f.studyId}/analysis.json`,
      `/labs/${f.labId}/api/studies/${f.studyId}/readings.csv`,
      `/labs/${f.labId}/api/studies/${f.studyId}/outcomes.csv`,
      `/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`,
    ];
    for (const url of urls) {
      const response = await f.analyst.client.get(url);
      expect(response.status, url).toBe(200);
      const body = await response.text();
      expect(leaks(body, f), url).toEqual([]);
      if (url.endsWith(`${f.studyId}/results`)) expect(body).toContain("Arm A");
    }
    const page = await (await f.analyst.client.get(urls[1])).text();
    expect(page).toContain("Blinded.");

    // An analyst cannot unblind; the lead confirms on the record.
    expect((await f.analyst.client.post(`/labs/${f.labId}/studies/${f.studyId}/results/unblind`, { confirm: "unblind" })).status).toBe(403);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results/unblind`, {})).status).toBe(400);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results/unblind`, { confirm: "unblind" })).status).toBe(302);
    await waitForMail(inject("mailDir"), f.analyst.email, /Study unblinded/);
    const after = await (await f.analyst.client.get(urls[1])).text();
    expect(after).toContain(f.ids.armNames[0]);
    expect(after).toContain("The analysis was done blind");
    const audit = await db().execute(sql`SELECT action, actor_id FROM audit_events WHERE object_id = ${f.studyId} AND action = 'study.unblinded'`);
    expect(audit.rows).toHaveLength(1);
    expect(audit.rows[0].actor_id).toBe(f.lead.id);
    // Unblinding does not change the blinded analysis or its hash.
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    expect(study.state).toBe("unblinded");
  });

  it("the one arm that dulls faster shows fewer cuts to threshold, with a Welch comparison and Hedges' g", async () => {
    const f = await createStudyFixture({ replicates: 2, cap: 20 });
    await finishAllRuns(f, 20);
    await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" });
    const chart = await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/analysis.json`)).json();
    expect(chart.armIntervals).toHaveLength(2);
    // The slow-dulling arm needs more cuts to reach the threshold.
    const labels = await db().execute(sql`SELECT id, neutral_label FROM study_arms WHERE study_id = ${f.studyId}`);
    const slowLabel = labels.rows.find((r) => r.id === f.armIds[0])!.neutral_label as string;
    const slow = chart.armIntervals.find((a: { arm: string }) => a.arm === slowLabel);
    const fast = chart.armIntervals.find((a: { arm: string }) => a.arm !== slowLabel);
    expect(slow.mean).toBeGreaterThan(fast.mean);
    // Source: simple-statistics (independent library): the arm means and SDs stored at closing equal
    // those of the blade means recomputed from the per-run outcomes CSV.
    const outcomes = Papa.parse<Record<string, string>>(await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/outcomes.csv`)).text(), { header: true, skipEmptyLines: true }).data;
    for (const arm of chart.armIntervals as { arm: string; mean: number }[]) {
      const byBlade = new Map<string, number[]>();
      for (const row of outcomes.filter((o) => o.arm_label === arm.arm)) byBlade.set(row.blade_code, [...(byBlade.get(row.blade_code) ?? []), Number(row.cuts_to_threshold)]);
      const bladeMeans = [...byBlade.values()].map((v) => ss.mean(v));
      expect(arm.mean).toBeCloseTo(ss.mean(bladeMeans), 10);
    }
    expect(chart.effects).toHaveLength(1);
    expect(chart.survival.length).toBeGreaterThan(2);
    const html = await (await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/results`)).text();
    expect(html).toContain("Welch two-sample t on blade means, Holm-adjusted");
    expect(html).toContain("Hedges&#x27; g");
  });

  it("16.5 each declared secondary outcome has its own section on the results page, report and bundle, read as supportive", async () => {
    const f = await createStudyFixture({ replicates: 2, cap: 20 });
    await db().update(studies).set({ secondaryOutcomes: ["working_sharpness", "baseline_sharpness"] }).where(eq(studies.id, f.studyId));
    await finishAllRuns(f, 20);
    await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" });
    const text = (r: Response) => r.text().then((t) => t.replace(/<!-- -->/g, "").replace(/&#x27;/g, "'"));
    const html = await text(await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/results`));
    expect(html).toContain("Secondary outcomes");
    expect(html).toContain("Secondary: no adjustment across outcomes; read as supportive.");
    expect(html).toContain("Working sharpness (gf)");
    expect(html).toContain("Baseline sharpness (gf)");
    // The fixture's protocol version was published through the app, so it declares its cap (20 cuts) as the horizon.
    expect(html).toContain("over a fixed horizon of the first 20 cuts");
    // The headline stays the primary outcome: its table comes first.
    expect(html.indexOf("Cuts to threshold by arm")).toBeLessThan(html.indexOf("Secondary outcomes"));
    const report = await text(await f.analyst.client.get(`/labs/${f.labId}/studies/${f.studyId}/report`));
    expect(report).toContain("Secondary: Working sharpness, Baseline sharpness");
    // Raw ids stay in the page's data and element ids, never in the text it shows.
    expect(report.replace(/<script[\s\S]*?<\/script>/g, "").replace(/<[^>]+>/g, " ")).not.toContain("working_sharpness");
    expect(report).toContain("Secondary: no adjustment across outcomes; read as supportive.");
    const bundleText = await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`)).text();
    const bundle = JSON.parse(bundleText);
    const secondary = bundle.analysis.secondary as { outcome: { key: string }; parallel: { arms: { arm: string; descriptives: { mean: number } }[] } }[];
    expect(secondary.map((s) => s.outcome.key)).toEqual(["working_sharpness", "baseline_sharpness"]);
    // Source: simple-statistics (independent library): the secondary arm means equal the blade means of the per-run baseline in the outcomes CSV.
    const outcomes = Papa.parse<Record<string, string>>(await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/outcomes.csv`)).text(), { header: true, skipEmptyLines: true }).data;
    for (const arm of secondary[1].parallel.arms) {
      const byBlade = new Map<string, number[]>();
      for (const row of outcomes.filter((o) => o.arm_label === arm.arm)) byBlade.set(row.blade_code, [...(byBlade.get(row.blade_code) ?? []), Number(row.baseline_gf)]);
      expect(arm.descriptives.mean).toBeCloseTo(ss.mean([...byBlade.values()].map((v) => ss.mean(v))), 8);
    }
    expect(reanalyze(bundleText).ok).toBe(true);
  });

  it("testers never read results (403), another lab gets 404, and a running study shows no outcomes", async () => {
    const f = await createStudyFixture();
    const other = await createStudyFixture();
    const results = `/labs/${f.labId}/studies/${f.studyId}/results`;
    expect((await f.testers[0].client.get(results)).status).toBe(403);
    expect((await f.testers[0].client.get(`/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`)).status).toBe(403);
    expect((await other.lead.client.get(results)).status).toBe(404);
    expect((await other.lead.client.get(`/labs/${other.labId}/studies/${f.studyId}/results`)).status).toBe(404);
    const running = await f.analyst.client.get(results);
    expect(running.status).toBe(200);
    expect(await running.text()).toContain("Results are read after the study is closed");
    expect((await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/analysis.json`)).status).toBe(409);
    expect((await f.analyst.client.post(results, { intent: "close" })).status).toBe(403);
  });
});

describe("the reproducibility bundle", () => {
  it("validates against its committed JSON Schema, reanalyzes to the same figures, and a changed reading is caught", async () => {
    // The committed schema is the one the zod schema generates.
    const committed = JSON.parse(readFileSync(path.resolve(import.meta.dirname, "../../docs/bundle.schema.json"), "utf8"));
    expect(committed).toEqual(JSON.parse(JSON.stringify(bundleJsonSchema())));

    const f = await createStudyFixture({ replicates: 2 });
    await finishAllRuns(f);
    await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" });
    const text = await (await f.analyst.client.get(`/labs/${f.labId}/api/studies/${f.studyId}/bundle.json`)).text();
    const bundle = JSON.parse(text);
    // Source: an independent JSON Schema validator from the npm registry (ajv, draft 2020-12).
    const validate = new Ajv2020({ strict: false, allErrors: true }).compile(committed);
    expect(validate(bundle), JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);

    expect(reanalyze(text).ok).toBe(true);
    const dir = mkdtempSync(path.join(os.tmpdir(), "blindcut-bundle-"));
    const good = path.join(dir, "bundle.json");
    writeFileSync(good, text);
    const tsx = path.resolve(import.meta.dirname, "../../node_modules/tsx/dist/cli.mjs");
    const ok = spawnSync(process.execPath, [tsx, "scripts/reanalyze.ts", good], { encoding: "utf8", cwd: path.resolve(import.meta.dirname, "../..") });
    expect(ok.status, ok.stdout + ok.stderr).toBe(0);
    expect(ok.stdout).toContain("every figure");

    // Change one reading, and refresh the raw hash so only the figures can betray it.
    const tampered = structuredClone(bundle);
    const reading = tampered.raw.readings.find((r: { cut: number }) => r.cut === 2);
    reading.value += 50;
    const { canonicalHash } = await import("~/domain/canonical-hash.ts");
    tampered.hashes.raw = canonicalHash(tampered.raw);
    const bad = path.join(dir, "tampered.json");
    writeFileSync(bad, JSON.stringify(tampered));
    const refused = spawnSync(process.execPath, [tsx, "scripts/reanalyze.ts", bad], { encoding: "utf8", cwd: path.resolve(import.meta.dirname, "../..") });
    expect(refused.status).toBe(1);
    expect(refused.stdout).toMatch(/DIFFERS analysis\.runs\[\d+\]\.(force|curve)/);
  });
});
