// Protocols: versioned, frozen on publish. Routes call these; every change runs in a
// transaction, and publishing records its audit event in that same transaction.
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { data } from "react-router";
import { z } from "zod";
import { isUuid, notFound } from "./access.server.ts";
import { db, type DbOrTx, type Transaction } from "./db.server.ts";
import { instruments, media, protocols, protocolVersions, type ProtocolVersion } from "./db/schema/index.ts";
import { recordAudit } from "./audit.server.ts";
import { UserFacingError } from "./accounts.server.ts";
import { diffProtocolContent, parseProtocolContent, templateContent, withDeclaredHorizon, type FieldChange, type ProtocolContent, type TemplateId } from "~/domain/protocol.ts";
import { protocolContentHash } from "~/domain/protocol-hash.ts";

/** Thrown when stored or submitted content fails the schema: field messages by path. */
export class ProtocolContentError extends Error {
  constructor(readonly errors: Record<string, string>) {
    super("The protocol has mistakes: see the fields");
  }
}

export type Actor = { id: string };

function notFoundError(): never {
  throw new UserFacingError("This protocol does not exist, or it belongs to another lab", undefined, 404);
}

/** Refuses a medium that is not this lab's. */
async function checkMedium(tx: DbOrTx, labId: string, content: ProtocolContent) {
  const id = content.medium.mediumId;
  if (!id) return;
  const [row] = await tx.select({ id: media.id, kind: media.kind }).from(media).where(and(eq(media.id, id), eq(media.labId, labId))).limit(1);
  if (!row) throw new ProtocolContentError({ "medium.mediumId": "Choose one of this lab's media" });
  const wanted = content.measurementKind === "card_depth" ? "card" : "rope";
  if (row.kind !== wanted) {
    throw new ProtocolContentError({
      "medium.mediumId": content.measurementKind === "card_depth" ? "A card-depth protocol cuts card: choose a card medium" : "An edge-force protocol cuts rope: choose a rope medium",
    });
  }
}

function validContent(input: unknown): ProtocolContent {
  const parsed = parseProtocolContent(input);
  if (!parsed.ok) throw new ProtocolContentError(parsed.errors);
  return parsed.content;
}

/**
 * Content to publish: valid, with the working-sharpness horizon declared (the cap unless
 * given). Drafts may leave it empty, so that it follows the cap while the draft is edited.
 */
function validPublishedContent(input: unknown): ProtocolContent {
  return withDeclaredHorizon(validContent(input));
}

// ---------------------------------------------------------------------------
// Reading.

export type ProtocolSummary = {
  id: string;
  name: string;
  latestPublished: number | null;
  latestPublishedAt: Date | null;
  draftVersion: number | null;
  measurementKind: ProtocolContent["measurementKind"];
  versionCount: number;
};

/**
 * The lab's protocols. Without drafts (testers, analysts), only protocols with a
 * published version are listed, and only their published versions are counted.
 */
export async function listProtocols(labId: string, { includeDrafts }: { includeDrafts: boolean }): Promise<ProtocolSummary[]> {
  const rows = await db()
    .select({
      id: protocols.id,
      name: protocols.name,
      version: protocolVersions.version,
      state: protocolVersions.state,
      publishedAt: protocolVersions.publishedAt,
      content: protocolVersions.content,
    })
    .from(protocols)
    .innerJoin(protocolVersions, eq(protocolVersions.protocolId, protocols.id))
    .where(and(eq(protocols.labId, labId), includeDrafts ? undefined : eq(protocolVersions.state, "published")))
    .orderBy(asc(protocols.name), asc(protocolVersions.version));
  const byId = new Map<string, ProtocolSummary>();
  for (const r of rows) {
    const s = byId.get(r.id) ?? {
      id: r.id,
      name: r.name,
      latestPublished: null,
      latestPublishedAt: null,
      draftVersion: null,
      measurementKind: r.content.measurementKind,
      versionCount: 0,
    };
    s.versionCount += 1;
    if (r.state === "published") {
      s.latestPublished = r.version;
      s.latestPublishedAt = r.publishedAt;
      s.measurementKind = r.content.measurementKind;
      if (!includeDrafts) s.name = r.content.name;
    } else {
      s.draftVersion = r.version;
      s.measurementKind = r.content.measurementKind;
    }
    byId.set(r.id, s);
  }
  return [...byId.values()];
}

export type VersionRow = Pick<ProtocolVersion, "id" | "version" | "state" | "contentHash" | "createdAt" | "updatedAt" | "publishedAt" | "basedOnVersion"> & {
  name: string;
};

/** A protocol with its versions (newest first); 404 when it is not this lab's, or holds nothing the reader may see. */
export async function getProtocol(labId: string, protocolId: string, { includeDrafts }: { includeDrafts: boolean }) {
  const [protocol] = await db().select().from(protocols).where(and(eq(protocols.id, protocolId), eq(protocols.labId, labId))).limit(1);
  if (!protocol) notFoundError();
  const rows = await db()
    .select()
    .from(protocolVersions)
    .where(and(eq(protocolVersions.protocolId, protocolId), eq(protocolVersions.labId, labId), includeDrafts ? undefined : eq(protocolVersions.state, "published")))
    .orderBy(desc(protocolVersions.version));
  const versions: VersionRow[] = rows.map((r) => ({
    id: r.id,
    version: r.version,
    state: r.state,
    contentHash: r.contentHash,
    createdAt: r.createdAt,
    updatedAt: r.updatedAt,
    publishedAt: r.publishedAt,
    basedOnVersion: r.basedOnVersion,
    name: r.content.name,
  }));
  return { protocol, versions };
}

/** Whether the protocol has any published version (a reader without draft rights sees nothing otherwise). */
export async function hasPublishedVersion(labId: string, protocolId: string) {
  const [row] = await db()
    .select({ id: protocolVersions.id })
    .from(protocolVersions)
    .where(and(eq(protocolVersions.protocolId, protocolId), eq(protocolVersions.labId, labId), eq(protocolVersions.state, "published")))
    .limit(1);
  return !!row;
}

/** One version, held to the lab; 404 when it does not exist there. */
export async function getVersion(labId: string, protocolId: string, version: number, tx: DbOrTx = db()): Promise<ProtocolVersion> {
  const [row] = await tx
    .select()
    .from(protocolVersions)
    .where(and(eq(protocolVersions.protocolId, protocolId), eq(protocolVersions.labId, labId), eq(protocolVersions.version, version)))
    .limit(1);
  if (!row) notFoundError();
  return row;
}

/** The lab's media a protocol may name (the editor's choices). */
export async function mediaChoices(labId: string) {
  return db().select({ id: media.id, name: media.name, kind: media.kind, material: media.material, sizeMm: media.sizeMm }).from(media).where(eq(media.labId, labId)).orderBy(asc(media.name));
}

/** The lab's sharpness testers and their maximum readings, as hints beside the threshold. */
export async function sharpnessTesterHints(labId: string) {
  const rows = await db()
    .select({ name: instruments.name, maxReading: instruments.maxReading })
    .from(instruments)
    .where(and(eq(instruments.labId, labId), eq(instruments.kind, "sharpness_tester"), eq(instruments.retired, false)))
    .orderBy(asc(instruments.name));
  return rows.map((r) => (r.maxReading === null ? `${r.name}: maximum not recorded` : `${r.name}: up to ${r.maxReading} gf`));
}

/** Names of media by id, for the read-only and bench pages. */
export async function mediumNames(labId: string, ids: (string | null)[]) {
  const wanted = ids.filter((x): x is string => !!x);
  if (!wanted.length) return new Map<string, string>();
  const rows = await db().select({ id: media.id, name: media.name }).from(media).where(and(eq(media.labId, labId), inArray(media.id, wanted)));
  return new Map(rows.map((r) => [r.id, r.name]));
}

// ---------------------------------------------------------------------------
// Changing. The *Tx functions run inside a caller's transaction (the demo loader uses them).

export async function createProtocolTx(tx: Transaction, actor: Actor | null, labId: string, input: { template: TemplateId; name: string }) {
  const content = validContent(templateContent(input.template, input.name));
  const [protocol] = await tx.insert(protocols).values({ labId, name: content.name, createdBy: actor?.id ?? null }).returning();
  const [version] = await tx
    .insert(protocolVersions)
    .values({ protocolId: protocol.id, labId, version: 1, state: "draft", content, createdBy: actor?.id ?? null })
    .returning();
  await recordAudit(tx, {
    labId,
    actorId: actor?.id ?? null,
    action: "protocol.created",
    objectType: "protocol",
    objectId: protocol.id,
    details: { template: input.template, name: content.name },
  });
  return { protocol, version };
}

/** A new protocol with version 1 as a draft, from a template or from defaults. */
export function createProtocol(actor: Actor, labId: string, input: { template: TemplateId; name: string }) {
  return db().transaction((tx) => createProtocolTx(tx, actor, labId, input));
}

export async function saveDraftTx(tx: Transaction, labId: string, protocolId: string, version: number, input: unknown) {
  const content = validContent(input);
  await checkMedium(tx, labId, content);
  const [row] = await tx
    .select({ id: protocolVersions.id, state: protocolVersions.state })
    .from(protocolVersions)
    .where(and(eq(protocolVersions.protocolId, protocolId), eq(protocolVersions.labId, labId), eq(protocolVersions.version, version)))
    .for("update")
    .limit(1);
  if (!row) notFoundError();
  if (row.state !== "draft") throw new UserFacingError(`Version ${version} is published and frozen: start a new draft from it to make changes`, undefined, 409);
  await tx.update(protocolVersions).set({ content, updatedAt: new Date() }).where(eq(protocolVersions.id, row.id));
  await tx.update(protocols).set({ name: content.name }).where(eq(protocols.id, protocolId));
  return content;
}

/** Saves a draft's whole content; refuses a published version (409) and bad content (field messages). */
export function saveDraft(labId: string, protocolId: string, version: number, input: unknown) {
  return db().transaction((tx) => saveDraftTx(tx, labId, protocolId, version, input));
}

export async function publishVersionTx(tx: Transaction, actor: Actor, labId: string, protocolId: string, version: number) {
  const [row] = await tx
    .select()
    .from(protocolVersions)
    .where(and(eq(protocolVersions.protocolId, protocolId), eq(protocolVersions.labId, labId), eq(protocolVersions.version, version)))
    .for("update")
    .limit(1);
  if (!row) notFoundError();
  if (row.state !== "draft") throw new UserFacingError(`Version ${version} is already published`, undefined, 409);
  // Re-checked at publishing: the stored draft must still pass today's rules (and declare its horizon).
  const content = validPublishedContent(row.content);
  await checkMedium(tx, labId, content);
  const contentHash = protocolContentHash(content);
  const publishedAt = new Date();
  const [published] = await tx
    .update(protocolVersions)
    .set({ state: "published", content, contentHash, publishedAt, publishedBy: actor.id, updatedAt: publishedAt })
    .where(eq(protocolVersions.id, row.id))
    .returning();
  await tx.update(protocols).set({ name: content.name }).where(eq(protocols.id, protocolId));
  await recordAudit(tx, {
    labId,
    actorId: actor.id,
    action: "protocol.published",
    objectType: "protocol_version",
    objectId: row.id,
    details: { protocolId, version, name: content.name, contentHash },
  });
  return published;
}

/** Freezes a draft: records the SHA-256 of its canonical content and an audit event. */
export function publishVersion(actor: Actor, labId: string, protocolId: string, version: number) {
  return db().transaction((tx) => publishVersionTx(tx, actor, labId, protocolId, version));
}

/** Saves the draft and, when asked, publishes it: both land or neither. */
export function saveDraftAndMaybePublish(actor: Actor, labId: string, protocolId: string, version: number, input: unknown, publish: boolean) {
  return db().transaction(async (tx) => {
    await saveDraftTx(tx, labId, protocolId, version, input);
    if (publish) await publishVersionTx(tx, actor, labId, protocolId, version);
  });
}

export async function newDraftFromTx(tx: Transaction, actor: Actor, labId: string, protocolId: string, fromVersion: number) {
  // One writer per protocol: two leads pressing at once get one draft, not two.
  const [protocol] = await tx.select().from(protocols).where(and(eq(protocols.id, protocolId), eq(protocols.labId, labId))).for("update").limit(1);
  if (!protocol) notFoundError();
  const source = await getVersion(labId, protocolId, fromVersion, tx);
  if (source.state !== "published") throw new UserFacingError(`Version ${fromVersion} is still a draft: edit it directly`, undefined, 409);
  const all = await tx.select({ version: protocolVersions.version, state: protocolVersions.state }).from(protocolVersions).where(eq(protocolVersions.protocolId, protocolId));
  const draft = all.find((v) => v.state === "draft");
  if (draft) throw new UserFacingError(`Version ${draft.version} is already a draft: edit or publish it first`, undefined, 409);
  const next = Math.max(...all.map((v) => v.version)) + 1;
  const [created] = await tx
    .insert(protocolVersions)
    .values({ protocolId, labId, version: next, state: "draft", content: source.content, basedOnVersion: fromVersion, createdBy: actor.id })
    .returning();
  await recordAudit(tx, {
    labId,
    actorId: actor.id,
    action: "protocol.draft_started",
    objectType: "protocol_version",
    objectId: created.id,
    details: { protocolId, version: next, basedOn: fromVersion },
  });
  return created;
}

/** A new draft version copied from a published one. */
export function newDraftFrom(actor: Actor, labId: string, protocolId: string, fromVersion: number) {
  return db().transaction((tx) => newDraftFromTx(tx, actor, labId, protocolId, fromVersion));
}

/** Two versions of one protocol, field by field. */
export async function compareVersions(labId: string, protocolId: string, a: number, b: number): Promise<{ a: ProtocolVersion; b: ProtocolVersion; changes: FieldChange[] }> {
  const [va, vb] = await Promise.all([getVersion(labId, protocolId, a), getVersion(labId, protocolId, b)]);
  return { a: va, b: vb, changes: diffProtocolContent(va.content, vb.content) };
}

// ---------------------------------------------------------------------------
// Helpers for routes.

/** Leads and owners write protocols and see drafts; testers and analysts read published versions. */
/** Whether the protocol belongs to the lab: actions check it before reading their input, so another lab's id is 404. */
export async function requireProtocolOfLab(labId: string, protocolId: string) {
  const [row] = await db().select({ id: protocols.id }).from(protocols).where(and(eq(protocols.id, protocolId), eq(protocols.labId, labId))).limit(1);
  if (!row) notFoundError();
}

export function canWriteProtocols(role: string) {
  return role === "owner" || role === "lead";
}

export function forbidDrafts(): never {
  throw data("Drafts are for the lab's leads and owners: only published protocols can be read with your role.", { status: 403 });
}

const VersionParam = z.coerce.number().int().min(1).max(100000);

/** A version number from the URL; 404 for anything that is not one. */
export function versionParam(raw: string | undefined): number {
  const parsed = VersionParam.safeParse(raw);
  if (!parsed.success) notFound();
  return parsed.data;
}

/** A protocol id from the URL; 404 for anything that is not a uuid. */
export function protocolIdParam(raw: string | undefined): string {
  if (!isUuid(raw)) notFound();
  return raw;
}
