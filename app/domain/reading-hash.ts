import { canonicalHash } from "./canonical-hash.ts";

/** The content of a stored reading that its own hash covers (readings are append-only). */
export type ReadingContent = {
  id: string;
  runId: string;
  attempt: number;
  cut: number;
  position: string;
  kind: "check" | "confirmation";
  value: number;
  supersedesId: string | null;
  reason: string | null;
  enteredBy: string;
  enteredAt: string; // ISO 8601
};

/** A reading's place in its run's chain: 1, 2, 3, ... and the hash of the reading before (null for the first). */
export type ReadingLink = { runSeq: number; prevHash: string | null };

/**
 * SHA-256 of the RFC 8785 canonical JSON of a reading's content and, for a chained
 * reading, its place in the run's chain (so the hash of each reading covers the one
 * before it: a reading removed, inserted or changed breaks the chain after it). The run
 * row is locked while a reading is stored, so the chain of one run has one writer at a
 * time and runs never wait on one another. Without a link: the hash of rows stored
 * before readings were chained.
 */
export function readingContentHash(r: ReadingContent, link?: ReadingLink | null): string {
  return canonicalHash(link ? { ...r, runSeq: link.runSeq, prevHash: link.prevHash } : { ...r });
}

/** The link a new reading takes after the given head of its run's chain. */
export function nextLink(head: { readingCount: number; lastReadingHash: string | null }): ReadingLink {
  return { runSeq: head.readingCount + 1, prevHash: head.lastReadingHash };
}
