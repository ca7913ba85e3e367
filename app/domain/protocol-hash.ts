/**
 * The content hash of a protocol version: SHA-256 of the RFC 8785 canonical JSON of
 * the parsed content (see `ProtocolContentSchema`). It covers every content field and
 * nothing else: not the protocol's id, version number, state, author or dates.
 * Server-side only (node:crypto, through canonical-hash).
 */
import { canonicalHash } from "./canonical-hash.ts";
import type { ProtocolContent } from "./protocol.ts";

export function protocolContentHash(content: ProtocolContent): string {
  return canonicalHash(content);
}
