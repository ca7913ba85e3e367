import { index, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";
import { blades } from "./library.ts";
import { protocolVersions } from "./protocols.ts";
import { studies } from "./studies.ts";

/**
 * A blade the lab keeps as a reference, with the protocol version it is cut under.
 * Its reference runs live in a study of kind "reference" (one per reference blade), so the
 * bench captures them with the same screens, stop rule and saving as study runs
 * (docs/decisions/reference-runs.md).
 */
export const referenceBlades = pgTable(
  "reference_blades",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    bladeId: uuid("blade_id").notNull().references(() => blades.id, { onDelete: "restrict" }),
    protocolVersionId: uuid("protocol_version_id").notNull().references(() => protocolVersions.id, { onDelete: "restrict" }),
    // The reference series: a study of kind "reference" holding this blade's runs.
    seriesStudyId: uuid("series_study_id").notNull().references(() => studies.id, { onDelete: "restrict" }),
    note: text("note").notNull().default(""),
    markedBy: uuid("marked_by").references(() => users.id, { onDelete: "set null" }),
    markedAt: timestamp("marked_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("reference_blades_once").on(t.labId, t.bladeId), index("reference_blades_lab").on(t.labId)],
);

export { studyKind } from "./quality-kind.ts";
export type ReferenceBlade = typeof referenceBlades.$inferSelect;
