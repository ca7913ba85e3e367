// A lab with every role and one object of every kind, and a second lab, for the
// tests that sweep every route: the role matrix, lab isolation and the blinding crawl.
import { asc, eq, sql } from "drizzle-orm";
import { db } from "~/server/db.server.ts";
import { protocolVersions, runs, studies } from "~/server/db/schema/index.ts";
import { recordSimulatedRun } from "~/server/simulated-runs.server.ts";
import { createStudyFixture, type StudyFixture } from "./study-fixture.ts";
import { multipartWithFile, TINY_PNG } from "./images.ts";
import { AppClient } from "./app-client.ts";

export async function finishAllRuns(f: StudyFixture, cap = 6) {
  await db().transaction(async (tx) => {
    const rows = await tx.select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition));
    for (const run of rows) {
      await recordSimulatedRun(tx, {
        labId: f.labId, runId: run.id, testerId: run.testerId, seed: `world/${run.schedulePosition}`, startAt: new Date(Date.now() - 3600_000),
        protocol: { threshold: 400, confirm: true, cap, checkEvery: 2, aggregation: "mean", positions: ["heel", "middle", "tip"] },
        model: { baselineMeanGf: 150, baselineSdGf: 10, lossRatePerCut: run.armId === f.armIds[0] ? 30 : 70, curvature: 0, noiseSdGf: 8 },
      });
    }
  });
}

async function labObjects(f: StudyFixture, lead: AppClient) {
  await lead.post(`/labs/${f.labId}/media`, { name: `Rope ${f.tag}`, kind: "rope", material: "manila", sizeMm: "12" });
  await lead.post(`/labs/${f.labId}/instruments`, { name: `Tester ${f.tag}`, kind: "sharpness_tester", testMedium: "line", resolution: "1", calibrationIntervalDays: "30" });
  const upload = await lead.request(`/labs/${f.labId}/uploads`, { method: "POST", body: multipartWithFile("file", "a.png", "image/png", TINY_PNG) });
  const { fileId } = (await upload.json()) as { fileId: string };
  const one = async (q: ReturnType<typeof sql>) => String((await db().execute(q)).rows[0]?.id);
  const [version] = await db().select().from(protocolVersions).where(eq(protocolVersions.id, f.protocolVersionId));
  const [run] = await db().select().from(runs).where(eq(runs.studyId, f.studyId)).orderBy(asc(runs.schedulePosition)).limit(1);
  return {
    labId: f.labId,
    studyId: f.studyId,
    bladeId: f.bladeIds[0],
    mediumId: await one(sql`SELECT id FROM media WHERE lab_id = ${f.labId} LIMIT 1`),
    instrumentId: await one(sql`SELECT id FROM instruments WHERE lab_id = ${f.labId} LIMIT 1`),
    fileId,
    protocolId: version.protocolId,
    version: String(version.version),
    runId: run.id,
    runTesterId: run.testerId,
    step: "question",
    token: "no-such-token",
  };
}

/** Lab A with a closed study and every kind of object; lab B likewise, for isolation. */
export async function buildWorld() {
  const a = await createStudyFixture({ replicates: 1, testers: 1 });
  await finishAllRuns(a);
  const b = await createStudyFixture({ replicates: 1, testers: 1 });
  const aObjects = await labObjects(a, a.lead.client);
  const bObjects = await labObjects(b, b.lead.client);
  expect200(await a.lead.client.post(`/labs/${a.labId}/studies/${a.studyId}/results`, { intent: "close" }));
  const [closed] = await db().select({ state: studies.state }).from(studies).where(eq(studies.id, a.studyId));
  if (closed.state !== "closed") throw new Error("the world's study did not close");
  const clients: Record<string, AppClient> = {
    anonymous: new AppClient(),
    owner: a.owner.client,
    lead: a.lead.client,
    tester: a.testers[0].client,
    analyst: a.analyst.client,
    otherLab: b.owner.client,
  };
  return { a, b, aObjects, bObjects, clients };
}

function expect200(response: Response) {
  if (response.status >= 400) throw new Error(`world setup request failed with ${response.status}`);
}
