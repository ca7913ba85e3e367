import { index, jsonb, pgTable, text, timestamp, uuid, bigserial } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";

// Append-only: a trigger in the migrations refuses UPDATE and DELETE. Each event
// carries the hash of its content and of the previous event of its lab.
export const auditEvents = pgTable(
  "audit_events",
  {
    seq: bigserial("seq", { mode: "number" }).primaryKey(),
    id: uuid("id").notNull().unique().defaultRandom(),
    labId: uuid("lab_id").references(() => labs.id, { onDelete: "restrict" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    objectType: text("object_type"),
    objectId: text("object_id"),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    prevHash: text("prev_hash"),
    hash: text("hash").notNull(),
  },
  (t) => [index("audit_events_lab_seq").on(t.labId, t.seq)],
);

export type AuditEvent = typeof auditEvents.$inferSelect;
