import { asc, eq } from "drizzle-orm";
import { db } from "../db.server.ts";
import { randomizationRolls } from "../db/schema/index.ts";

/**
 * The study's rolls in words: how many came before the final one, and when. The study
 * page, the report and the bundle all state it, so a schedule re-rolled until it looked
 * right shows on the record.
 */
export async function rollHistory(studyId: string) {
  const rows = await db().select({ rolledAt: randomizationRolls.rolledAt, seedSource: randomizationRolls.seedSource }).from(randomizationRolls).where(eq(randomizationRolls.studyId, studyId)).orderBy(asc(randomizationRolls.rolledAt));
  return {
    earlier: rows.slice(0, -1).map((r) => ({ at: r.rolledAt.toISOString(), seedSource: r.seedSource })),
    finalAt: rows.at(-1)?.rolledAt.toISOString() ?? null,
  };
}
