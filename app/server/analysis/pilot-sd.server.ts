import { and, desc, eq, inArray } from "drizzle-orm";
import { db } from "../db.server.ts";
import { studies } from "../db/schema/index.ts";
import { pooledSd } from "~/domain/pilot-sd.ts";
import type { StudyAnalysis } from "~/domain/study-analysis.ts";

/** The pooled SD of blade means from the lab's most recent finished parallel study, to plan the next one with. */
export async function latestPilotSd(labId: string) {
  const rows = await db()
    .select({ shortName: studies.shortName, snapshot: studies.blindedSnapshot })
    .from(studies)
    .where(and(eq(studies.labId, labId), eq(studies.design, "parallel"), inArray(studies.state, ["closed", "unblinded"])))
    .orderBy(desc(studies.closedAt))
    .limit(5);
  for (const row of rows) {
    const analysis = (row.snapshot as { analysis?: StudyAnalysis } | null)?.analysis;
    const arms = analysis?.parallel?.arms;
    if (!arms?.length) continue;
    const pooled = pooledSd(arms.filter((a) => a.descriptives.sd !== null).map((a) => ({ n: a.nBlades, sd: a.descriptives.sd! })));
    if (pooled && pooled.sd > 0) return { sd: pooled.sd, unit: analysis!.primaryOutcome.unit, studyName: row.shortName, blades: pooled.blades };
  }
  return null;
}
