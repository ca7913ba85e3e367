import { afterAll, describe, expect, it } from "vitest";
import * as ss from "simple-statistics";
import { eq } from "drizzle-orm";
import { createStudyFixture } from "../support/study-fixture.ts";
import { finishAllRuns } from "../support/world.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { studies } from "~/server/db/schema/index.ts";
import { pooledSd } from "~/domain/pilot-sd.ts";
import type { StudyAnalysis } from "~/domain/study-analysis.ts";

afterAll(closeDb);

describe("the sample-size planner offers the SD of a finished study", () => {
  it("shows no offer before any study is closed, then the pooled SD of the closed study's blade means", async () => {
    const f = await createStudyFixture({ replicates: 2, cap: 20 });
    const planner = `/labs/${f.labId}/planning/sample-size`;
    expect(await (await f.lead.client.get(planner)).text()).toContain("No finished study to take an SD from");
    await finishAllRuns(f, 20);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    const arms = (study.blindedSnapshot as { analysis: StudyAnalysis }).analysis.parallel!.arms;
    // The offer is the pooled SD of the arms' blade means, recomputed here from the stored snapshot.
    const expected = pooledSd(arms.map((a) => ({ n: a.nBlades, sd: a.descriptives.sd! })))!;
    // Source: simple-statistics (independent library): each arm's SD from its blade means.
    for (const a of arms) expect(a.descriptives.sd).toBeCloseTo(ss.sampleStandardDeviation(a.bladeMeans.map((b) => b.mean)), 10);
    const html = (await (await f.lead.client.get(planner)).text()).replace(/<!-- -->/g, "");
    expect(html).toContain(`Fixture study ${f.tag} measured an SD of`);
    expect(html).toContain(`sd=${expected.sd.toFixed(3)}`);
    // The offer never names arms: the planner is for leads, but it works from the blinded snapshot.
    for (const name of f.ids.armNames) expect(html).not.toContain(name);
  });

  it("16.7 offers only a study whose primary outcome is in the planned unit, naming its protocol version, blades, replicates and censoring", async () => {
    const f = await createStudyFixture({ replicates: 2, cap: 20 });
    const planner = `/labs/${f.labId}/planning/sample-size`;
    await finishAllRuns(f, 20);
    expect((await f.lead.client.post(`/labs/${f.labId}/studies/${f.studyId}/results`, { intent: "close" })).status).toBe(302);
    const [study] = await db().select().from(studies).where(eq(studies.id, f.studyId));
    const analysis = (study.blindedSnapshot as { analysis: StudyAnalysis }).analysis;
    expect(analysis.primaryOutcome.unit).toBe("cuts");
    const html = (await (await f.lead.client.get(`${planner}?design=two-sample&unit=cuts&sd=30&difference=30&alpha=0.05&power=0.8`)).text()).replace(/<!-- -->/g, "");
    expect(html).toContain(`Fixture study ${f.tag} measured an SD of`);
    expect(html).toContain("for cuts to threshold (its primary outcome)");
    expect(html).toMatch(/over \d+ blades and \d+ runs, 2 replicates per blade averaged/);
    expect(html).toMatch(/, version \d+; [\d.]+ % of runs censored/);
    const censored = analysis.parallel!.arms.reduce((t, a) => t + a.nCensoredRuns, 0);
    expect(html.includes("this SD is too small")).toBe(censored > 0);
    // Planning in gf or mm: a study measured in cuts is not offered.
    for (const unit of ["gf", "mm"]) {
      const other = (await (await f.lead.client.get(`${planner}?design=two-sample&unit=${unit}&sd=30&difference=30&alpha=0.05&power=0.8`)).text()).replace(/<!-- -->/g, "");
      expect(other).not.toContain(`Fixture study ${f.tag} measured an SD of`);
      expect(other).toContain("No finished study to take an SD from with a primary outcome in");
    }
  });
});
