// After randomization: the schedule preview, the label sheet, the schedule CSV (the
// lead's key) and the start of a study with its "runs assigned" mail. The schedule is
// read from the stored runs; the balance counts come from the domain's balanceSummary
// over the schedule regenerated from design, seed and algorithm version.
import { and, asc, count, eq } from "drizzle-orm";
import QRCode from "qrcode";
import { db } from "../db.server.ts";
import { blades, randomizationRolls, readings, runs, studies, studyArms, studyBlades, users, type Study, type User } from "../db/schema/index.ts";
import { appUrl, composeMail, sendMail } from "../mail.server.ts";
import { regenerateSchedule, startStudyTx } from "./randomize.server.ts";
import { DesignerError } from "./designer.server.ts";
import { balanceSummary } from "~/domain/randomization/index.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";
import { toCsv } from "~/lib/csv.ts";

async function studyOfLab(labId: string, studyId: string) {
  const [study] = await db().select().from(studies).where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  if (!study) throw new DesignerError("This study does not exist, or it belongs to another lab.", 404);
  return study;
}

/** The stored runs in schedule order, with each run's blind code, tester and arm. */
async function scheduleRows(studyId: string) {
  return db()
    .select({
      position: runs.schedulePosition,
      sitting: runs.sitting,
      replicate: runs.replicate,
      bladeRunNumber: runs.bladeRunNumber,
      state: runs.state,
      blindCode: studyBlades.blindCode,
      inventoryNumber: blades.inventoryNumber,
      testerId: runs.testerId,
      testerName: users.name,
      testerEmail: users.email,
      armId: runs.armId,
      armName: studyArms.name,
      neutralLabel: studyArms.neutralLabel,
    })
    .from(runs)
    .innerJoin(studyBlades, eq(studyBlades.id, runs.studyBladeId))
    .innerJoin(blades, eq(blades.id, studyBlades.bladeId))
    .innerJoin(users, eq(users.id, runs.testerId))
    .innerJoin(studyArms, eq(studyArms.id, runs.armId))
    .where(eq(runs.studyId, studyId))
    .orderBy(asc(runs.schedulePosition));
}

export async function readingCount(studyId: string) {
  const [{ n }] = await db().select({ n: count() }).from(readings).innerJoin(runs, eq(runs.id, readings.runId)).where(eq(runs.studyId, studyId));
  return n;
}

/** The preview a lead checks before starting: run order, sitting, tester, code, and the balance counts. */
export async function schedulePreview(labId: string, studyId: string) {
  const study = await studyOfLab(labId, studyId);
  if (study.state === "draft") return { study, rows: [], balance: null, rolls: [], readings: 0 };
  const rows = await scheduleRows(studyId);
  const schedule = await db().transaction((tx) => regenerateSchedule(tx, labId, studyId));
  const balance = schedule ? balanceSummary(schedule) : null;
  const rolls = await db()
    .select({ seed: randomizationRolls.seed, scheduleHash: randomizationRolls.scheduleHash, rolledAt: randomizationRolls.rolledAt, by: users.name })
    .from(randomizationRolls)
    .leftJoin(users, eq(users.id, randomizationRolls.rolledBy))
    .where(eq(randomizationRolls.studyId, studyId))
    .orderBy(asc(randomizationRolls.rolledAt));
  return {
    study,
    rows: rows.map((r) => ({ ...r, code: r.blindCode ? formatBlindCode(r.blindCode) : "" })),
    balance,
    rolls,
    readings: await readingCount(studyId),
  };
}

/**
 * The label sheet: one label per enrolled blade with its code (grouped for reading),
 * a QR code of the code as inline SVG, and the study's short name. Ordered by code,
 * never by arm or enrolment, and carrying nothing that identifies the blade or arm.
 */
export async function labelSheet(labId: string, studyId: string) {
  const study = await studyOfLab(labId, studyId);
  if (study.state === "draft") throw new DesignerError("Randomize the study first: the blind codes are drawn at randomization.", 409);
  const rows = await db().select({ code: studyBlades.blindCode }).from(studyBlades).where(eq(studyBlades.studyId, studyId));
  const codes = rows.map((r) => r.code).filter((c): c is string => !!c).sort();
  const labels = await Promise.all(
    codes.map(async (code) => ({
      code: formatBlindCode(code),
      // The QR code holds the code as stored (no separator): what the bench reads back.
      qrSvg: await QRCode.toString(code, { type: "svg", errorCorrectionLevel: "M", margin: 1 }),
    })),
  );
  return { shortName: study.shortName, labels };
}

const CSV_COLUMNS = ["position", "sitting", "tester", "tester_email", "blind_code", "blade_run", "replicate", "neutral_label", "arm_or_condition", "inventory_number", "state"] as const;


/** The schedule as CSV, one row per run: the lead's key (codes with their blades and arms), not for the bench. */
export async function scheduleCsv(labId: string, studyId: string) {
  const study = await studyOfLab(labId, studyId);
  if (study.state === "draft") throw new DesignerError("Randomize the study first: a draft has no schedule.", 409);
  const rows = await scheduleRows(studyId);
  const csv = toCsv(
    CSV_COLUMNS,
    rows.map((r) => [r.position, r.sitting, r.testerName, r.testerEmail, r.blindCode ? formatBlindCode(r.blindCode) : "", r.bladeRunNumber, r.replicate, r.neutralLabel ?? "", r.armName, r.inventoryNumber, r.state]),
  );
  return { study, csv };
}

/**
 * Starts a randomized study and tells each tester how many runs they have, with a
 * link to their queue. The mail carries the study's short name (shown to testers) and
 * a count: no code, no blade, no arm. Mail goes out after the commit; a failed mail
 * is reported, never undoes the start.
 */
export async function startStudy(actorId: string, labId: string, studyId: string, request: Request) {
  const { study, testers } = await db().transaction((tx) => startStudyTx(tx, actorId, labId, studyId));
  const link = appUrl("/bench");
  const failed: string[] = [];
  for (const t of testers) {
    const mail = composeMail(
      t.email,
      `Runs assigned: ${study.shortName}`,
      [
        `Hello ${t.name},`,
        `The study “${study.shortName}” has started. You have ${t.runs} run${t.runs === 1 ? "" : "s"} to do, in the order your queue shows.`,
        "Each blade is known at the bench by its blind code only. Confirm the code before the first cut.",
      ],
      { label: "Open your queue", url: link },
    );
    try {
      await sendMail(mail);
    } catch (error) {
      console.error("runs-assigned mail failed", error);
      failed.push(t.name);
    }
  }
  return { testers: testers.length, failed };
}

export type StartPageStudy = Pick<Study, "id" | "shortName" | "state">;

/** The start page: the study of the lab (null when it is another lab's) and how many runs each tester gets. */
export async function startPagePreview(labId: string, studyId: string): Promise<{ study: StartPageStudy; perTester: { name: User["name"]; runs: number }[] } | null> {
  const [study] = await db()
    .select({ id: studies.id, shortName: studies.shortName, state: studies.state })
    .from(studies)
    .where(and(eq(studies.id, studyId), eq(studies.labId, labId)));
  if (!study) return null;
  const perTester = await db()
    .select({ name: users.name, runs: count() })
    .from(runs)
    .innerJoin(users, eq(users.id, runs.testerId))
    .where(eq(runs.studyId, studyId))
    .groupBy(users.id, users.name);
  return { study, perTester };
}
