// A small running study in the e2e database's demo lab, assigned to the demo tester,
// built through the app's own server modules, for browser tests of the bench pages that
// must not change the demo studies other test files read.
import { inject } from "vitest";
import type { Page } from "playwright-core";

export type DemoBenchStudy = { labId: string; studyId: string; shortName: string; runIds: string[]; codes: Map<string, string> };

export async function createDemoBenchStudy(label: string, options: { cap?: number; question?: string } = {}): Promise<DemoBenchStudy> {
  process.env.DATABASE_URL = inject("e2eDatabaseUrl");
  const { db } = await import("~/server/db.server.ts");
  const { asc, eq } = await import("drizzle-orm");
  const schema = await import("~/server/db/schema/index.ts");
  const { createProtocolTx, publishVersionTx, saveDraftTx } = await import("~/server/protocols.server.ts");
  const { randomizeStudyTx, startStudyTx } = await import("~/server/studies/randomize.server.ts");
  const { templateContent } = await import("~/domain/protocol.ts");
  const tag = Math.random().toString(36).slice(2, 7).toUpperCase();
  const [lab] = await db().select({ id: schema.labs.id }).from(schema.labs).where(eq(schema.labs.isDemo, true));
  const userId = async (email: string) => (await db().select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)))[0].id;
  const leadId = await userId("lead@demo.test");
  const testerId = await userId("tester@demo.test");
  const shortName = `${label} ${tag}`;
  const studyId = await db().transaction(async (tx) => {
    const name = `${label} rope ${tag}`;
    const { protocol } = await createProtocolTx(tx, { id: leadId }, lab.id, { template: "rope", name });
    const content = templateContent("rope", name);
    content.replicatesPerBlade = 1;
    content.edgeForce = { ...content.edgeForce!, positions: ["heel", "tip"], checkEveryCuts: 1, capCuts: options.cap ?? 4 };
    await saveDraftTx(tx, lab.id, protocol.id, 1, content);
    const version = await publishVersionTx(tx, { id: leadId }, lab.id, protocol.id, 1);
    const bladeRows = await tx.select({ id: schema.blades.id }).from(schema.blades).where(eq(schema.blades.labId, lab.id)).orderBy(asc(schema.blades.inventoryNumber)).limit(4);
    const [s] = await tx
      .insert(schema.studies)
      .values({
        labId: lab.id,
        shortName,
        question: options.question ?? "Do the bench screens work for everyone?",
        protocolVersionId: version.id,
        design: "parallel",
        analysisPlan: { alpha: 0.05, comparisons: "all_pairs", referenceArmId: null, tests: ["welch_t"] },
        randomization: { method: "complete", blockSizes: [], stratifyByTester: false, sittingLength: 2, replicates: 1 },
        createdBy: leadId,
      })
      .returning();
    const arms = await tx.insert(schema.studyArms).values([0, 1].map((i) => ({ studyId: s.id, labId: lab.id, name: `${label} arm ${i}`, position: i }))).returning();
    await tx.insert(schema.studyBlades).values(bladeRows.map((b, i) => ({ studyId: s.id, labId: lab.id, bladeId: b.id, armId: arms[i % 2].id })));
    await tx.insert(schema.studyTesters).values({ studyId: s.id, userId: testerId });
    await randomizeStudyTx(tx, leadId, lab.id, s.id, `${label}-${tag}`);
    await startStudyTx(tx, leadId, lab.id, s.id);
    return s.id;
  });
  const rows = await db()
    .select({ id: schema.runs.id, code: schema.studyBlades.blindCode })
    .from(schema.runs)
    .innerJoin(schema.studyBlades, eq(schema.studyBlades.id, schema.runs.studyBladeId))
    .where(eq(schema.runs.studyId, studyId))
    .orderBy(asc(schema.runs.schedulePosition));
  return { labId: lab.id, studyId, shortName, runIds: rows.map((r) => r.id), codes: new Map(rows.map((r) => [r.id, r.code!])) };
}

/** How many readings a run has stored. */
export async function readingCount(runId: string) {
  const { db } = await import("~/server/db.server.ts");
  const { eq, sql } = await import("drizzle-orm");
  const schema = await import("~/server/db/schema/index.ts");
  return (await db().select({ n: sql<number>`count(*)::int` }).from(schema.readings).where(eq(schema.readings.runId, runId)))[0].n;
}

export async function closeDemoBenchDb() {
  const { closeDb } = await import("~/server/db.server.ts");
  await closeDb();
}

export { signInAs } from "./browser.ts";

/** The tester starts a run through its setup form (code, ticks, lot, instrument, room). */
export async function startRunAsTester(page: Page, code: string) {
  await page.getByLabel("1. Blind code on the blade's label").fill(code);
  await page.getByTestId("code-ok").waitFor();
  for (const box of await page.locator('input[type="checkbox"]').all()) await box.check();
  await page.getByLabel("Media lot").selectOption({ index: 1 });
  await page.getByLabel("Instrument").selectOption({ index: 1 });
  await page.getByLabel(/Room temperature/).fill("21");
  await page.getByLabel(/Relative humidity/).fill("45");
  await page.getByRole("button", { name: "Start the run" }).click();
  await page.getByTestId("entry-label").waitFor();
}
