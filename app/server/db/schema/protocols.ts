import { sql } from "drizzle-orm";
import { check, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./accounts.ts";
import type { ProtocolContent } from "../../../domain/protocol.ts";

export const protocolVersionState = pgEnum("protocol_version_state", ["draft", "published"]);
export type ProtocolVersionState = (typeof protocolVersionState.enumValues)[number];

/** A protocol: a lab's named line of versions. Its name follows the latest saved version. */
export const protocols = pgTable(
  "protocols",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("protocols_lab").on(t.labId)],
);

/**
 * One version of a protocol. Drafts are edited in place; publishing freezes the row
 * and records the SHA-256 of its canonical content. A trigger in the migrations
 * refuses UPDATE and DELETE of a published row; later edits make a new version.
 */
export const protocolVersions = pgTable(
  "protocol_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    protocolId: uuid("protocol_id").notNull().references(() => protocols.id, { onDelete: "cascade" }),
    // Copied from the protocol so every query can be held to one lab.
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    state: protocolVersionState("state").notNull().default("draft"),
    content: jsonb("content").$type<ProtocolContent>().notNull(),
    contentHash: text("content_hash"),
    basedOnVersion: integer("based_on_version"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    publishedBy: uuid("published_by").references(() => users.id, { onDelete: "restrict" }),
  },
  (t) => [
    uniqueIndex("protocol_versions_number").on(t.protocolId, t.version),
    // At most one draft per protocol at a time.
    uniqueIndex("protocol_versions_one_draft").on(t.protocolId).where(sql`${t.state} = 'draft'`),
    index("protocol_versions_lab").on(t.labId),
    check("protocol_versions_version_positive", sql`${t.version} >= 1`),
    check(
      "protocol_versions_published_complete",
      sql`${t.state} <> 'published' OR (${t.contentHash} IS NOT NULL AND ${t.publishedAt} IS NOT NULL)`,
    ),
  ],
);

export type Protocol = typeof protocols.$inferSelect;
export type ProtocolVersion = typeof protocolVersions.$inferSelect;
export type NewProtocolVersion = typeof protocolVersions.$inferInsert;
