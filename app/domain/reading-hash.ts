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

/**
 * SHA-256 of the RFC 8785 canonical JSON of a reading's content. Each reading row
 * carries its own hash (no chain), so concurrent saves never wait on one another.
 */
export function readingContentHash(r: ReadingContent): string {
  return canonicalHash({ ...r });
}
