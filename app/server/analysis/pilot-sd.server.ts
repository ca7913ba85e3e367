import { and, desc, eq, inArray, sql } from "drizzle-orm";
import { db } from "../db.server.ts";
import { protocolVersions, studies } from "../db/schema/index.ts";
import { pilotSdOffers, type PilotStudy } from "~/domain/pilot-sd.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import type { StudyAnalysis } from "~/domain/study-analysis.ts";

/**
 * The pilot SDs the lab's finished parallel studies offer in one outcome unit: the latest
 * study for each primary outcome in that unit, with its protocol version, blades,
 * replicates and censored share (pilotSdOffers).
 */
export async function pilotSdOffersFor(labId: string, unit: string) {
  const rows = await db()
    // Only the parts of the snapshot the offer needs: the per-run analysis is most of its size.
    .select({
      shortName: studies.shortName,
      primaryOutcome: sql<StudyAnalysis["primaryOutcome"] | null>`${studies.blindedSnapshot} #> '{analysis,primaryOutcome}'`,
      arms: sql<NonNullable<StudyAnalysis["parallel"]>["arms"] | null>`${studies.blindedSnapshot} #> '{analysis,parallel,arms}'`,
      protocolVersion: protocolVersions.version,
      content: protocolVersions.content,
    })
    .from(studies)
    .leftJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId))
    .where(and(eq(studies.labId, labId), eq(studies.design, "parallel"), inArray(studies.state, ["closed", "unblinded"])))
    .orderBy(desc(studies.closedAt))
    .limit(20);
  const candidates: PilotStudy[] = [];
  for (const row of rows) {
    const outcome = row.primaryOutcome;
    const arms = row.arms;
    if (!outcome || !arms?.length) continue;
    const content = row.content as ProtocolContent | null;
    candidates.push({
      studyName: row.shortName,
      protocolName: content?.name ?? "protocol not recorded",
      protocolVersion: row.protocolVersion ?? 0,
      outcome: { key: outcome.key, label: outcome.label, unit: outcome.unit },
      replicatesPerBlade: content?.replicatesPerBlade ?? 1,
      arms: arms.map((a) => ({ nBlades: a.nBlades, sd: a.descriptives.sd, nRuns: a.nRuns, nCensoredRuns: a.nCensoredRuns })),
    });
  }
  return pilotSdOffers(candidates, unit);
}
