/**
 * Content hashes of protocols, designs and schedules: SHA-256 of the RFC 8785
 * canonical JSON (JSON Canonicalization Scheme) of a value, so that key order and
 * number spelling (1.0 vs 1) never change the hash. Server-side: uses node:crypto.
 *
 * References: RFC 8785, JSON Canonicalization Scheme (JCS), A. Rundgren, B. Jordan,
 * S. Erdtman, 2020 (implemented by the package `canonicalize`); FIPS 180-4, Secure
 * Hash Standard (SHA-256).
 */
import canonicalize from "canonicalize";
import { createHash } from "node:crypto";

function assertJsonValue(value: unknown, path: string, seen: Set<object>): void {
  if (value === null || typeof value === "string" || typeof value === "boolean") return;
  if (typeof value === "number") {
    if (!Number.isFinite(value)) throw new Error(`canonicalJson: ${path} is ${String(value)}; only finite numbers can be hashed`);
    return;
  }
  if (typeof value !== "object") {
    throw new Error(`canonicalJson: ${path} is ${typeof value === "undefined" ? "undefined" : `a ${typeof value}`}; only JSON values can be hashed`);
  }
  if (seen.has(value)) throw new Error(`canonicalJson: ${path} refers back to itself`);
  seen.add(value);
  if (Array.isArray(value)) {
    value.forEach((v, i) => assertJsonValue(v, `${path}[${i}]`, seen));
  } else {
    const proto = Object.getPrototypeOf(value);
    if (proto !== Object.prototype && proto !== null) {
      throw new Error(`canonicalJson: ${path} is not a plain object (convert dates and other objects to strings or numbers first)`);
    }
    for (const [k, v] of Object.entries(value)) assertJsonValue(v, `${path}.${k}`, seen);
  }
  seen.delete(value);
}

/**
 * The RFC 8785 canonical JSON text of a value: object members sorted by UTF-16 code
 * units, no whitespace, numbers in ECMAScript's shortest form, minimal string escapes.
 *
 * @param value a JSON value: null, booleans, finite numbers, strings, arrays and plain objects
 * @returns the canonical JSON text
 * @throws Error naming the path of anything that is not a JSON value (undefined,
 *   NaN, Infinity, functions, bigints, dates, class instances, cycles)
 */
export function canonicalJson(value: unknown): string {
  assertJsonValue(value, "$", new Set());
  const text = canonicalize(value);
  if (text === undefined) throw new Error("canonicalJson: the value has no JSON form");
  return text;
}

/**
 * SHA-256, as 64 lowercase hex digits, of the UTF-8 bytes of the RFC 8785 canonical
 * JSON of a value.
 *
 * @param value a JSON value (see canonicalJson)
 * @returns the hex digest
 * @throws Error as canonicalJson
 */
export function canonicalHash(value: unknown): string {
  return createHash("sha256").update(canonicalJson(value), "utf8").digest("hex");
}
