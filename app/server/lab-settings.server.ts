import { eq } from "drizzle-orm";
import { db } from "./db.server.ts";
import { labs } from "./db/schema/index.ts";
import { recordAudit } from "./audit.server.ts";

export async function labSettings(labId: string) {
  const [lab] = await db().select({ name: labs.name, timeZone: labs.timeZone }).from(labs).where(eq(labs.id, labId));
  return lab!;
}

/** Sets the lab's time zone (already validated as an IANA zone) and records the change. */
export async function setLabTimeZone(actorId: string, labId: string, timeZone: string) {
  await db().transaction(async (tx) => {
    const [before] = await tx.select({ timeZone: labs.timeZone }).from(labs).where(eq(labs.id, labId)).for("update");
    if (!before || before.timeZone === timeZone) return;
    await tx.update(labs).set({ timeZone }).where(eq(labs.id, labId));
    await recordAudit(tx, { labId, actorId, action: "lab.time_zone_changed", objectType: "lab", objectId: labId, details: { from: before.timeZone, to: timeZone } });
  });
}
