// The tester's queue: their runs in running studies across every lab where they test,
// in schedule order and grouped by sitting. Only what a tester may see is selected.
import { and, asc, eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { labs, memberships, runs, studies, studyBlades } from "../db/schema/index.ts";
import { RUN_STATE_WORDS } from "./runs.server.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";
import { ordinal } from "~/domain/bench/run-progress.ts";
import type { RunState } from "../db/schema/studies.ts";

export type QueueRun = {
  id: string;
  url: string;
  blindCode: string;
  runOfBlade: string;
  schedulePosition: number;
  state: RunState;
  stateWords: string;
  attempt: number;
  isNext: boolean;
};

export type QueueStudy = {
  labId: string;
  labName: string;
  studyId: string;
  shortName: string;
  sittings: { sitting: number; runs: QueueRun[] }[];
  nextRunId: string | null;
  remaining: number;
};

export async function testerQueue(userId: string): Promise<QueueStudy[]> {
  const rows = await db()
    .select({
      id: runs.id,
      labId: runs.labId,
      labName: labs.name,
      studyId: studies.id,
      shortName: studies.shortName,
      sitting: runs.sitting,
      schedulePosition: runs.schedulePosition,
      bladeRunNumber: runs.bladeRunNumber,
      state: runs.state,
      attempt: runs.attempt,
      blindCode: studyBlades.blindCode,
    })
    .from(runs)
    .innerJoin(studies, eq(studies.id, runs.studyId))
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .innerJoin(labs, eq(labs.id, runs.labId))
    .innerJoin(memberships, and(eq(memberships.labId, runs.labId), eq(memberships.userId, userId), eq(memberships.role, "tester")))
    .where(and(eq(runs.testerId, userId), eq(studies.state, "running")))
    .orderBy(asc(labs.name), asc(studies.shortName), asc(studies.id), asc(runs.schedulePosition));
  const byStudy = new Map<string, QueueStudy>();
  for (const r of rows) {
    let s = byStudy.get(r.studyId);
    if (!s) {
      s = { labId: r.labId, labName: r.labName, studyId: r.studyId, shortName: r.shortName, sittings: [], nextRunId: null, remaining: 0 };
      byStudy.set(r.studyId, s);
    }
    const open = r.state === "waiting" || r.state === "in_progress";
    if (open) s.remaining += 1;
    const isNext = open && s.nextRunId === null;
    if (isNext) s.nextRunId = r.id;
    let sitting = s.sittings.find((x) => x.sitting === r.sitting);
    if (!sitting) s.sittings.push((sitting = { sitting: r.sitting, runs: [] }));
    sitting.runs.push({
      id: r.id,
      url: `/labs/${r.labId}/bench/runs/${r.id}`,
      blindCode: r.blindCode ? formatBlindCode(r.blindCode) : "",
      runOfBlade: `${ordinal(r.bladeRunNumber)} run of this blade`,
      schedulePosition: r.schedulePosition,
      state: r.state,
      stateWords: RUN_STATE_WORDS[r.state],
      attempt: r.attempt,
      isNext,
    });
  }
  return [...byStudy.values()];
}
