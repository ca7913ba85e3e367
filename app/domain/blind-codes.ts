/**
 * Blind codes: one short random code per blade per study, with a check character
 * by ISO/IEC 7064 MOD 37-2, so that a mistyped code is refused at the bench.
 *
 * A code is 5 characters drawn uniformly and independently from the 36 digits and
 * capital letters, followed by 1 check character. The characters are drawn from a
 * seeded stream alone, never from the blade, its arm or its condition, so a code
 * carries no information about any of them. All 36 characters are kept: the app's
 * font (Atkinson Hyperlegible) tells 0/O and 1/I apart.
 *
 * Why MOD 37-2 and not the hybrid MOD 37,36: the hybrid system catches every single
 * substitution but not every swap of neighbours (e.g. "IJ..." and "JI..." give the
 * same running value, since 2 × 18 ≡ 36 mod 37 restarts the chain; about 0.2% of
 * the swaps in a sample of codes went undetected). The pure system MOD 37-2 works
 * modulo the prime 37 with weights 2^i, all non-zero and each different from its
 * neighbour, so it catches every single substitution and every adjacent
 * transposition. Its check character may be the supplementary "*" (value 36);
 * bodies whose check would be "*" are drawn again, so every code is alphanumeric
 * (36^5 × 36/37, about 58.9 million codes).
 *
 * Reference: ISO/IEC 7064:2003, Information technology — Security techniques —
 * Check character systems: the pure system MOD 37-2 (modulus 37, radix 2, one check
 * character from 0–9, A–Z, *), and the hybrid system MOD 37,36.
 */
import { createRandomSource, randomInt } from "./randomization/prng";

/** The characters of a code and their values 0 .. 35 in ISO/IEC 7064 (digits, then A–Z). */
export const BLIND_CODE_ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ";
/** Random characters in a code. */
export const BLIND_CODE_BODY_LENGTH = 5;
/** Characters in a code, check character included. */
export const BLIND_CODE_LENGTH = BLIND_CODE_BODY_LENGTH + 1;
/** The most codes one call may draw. */
export const MAX_BLIND_CODES = 100_000;

const M = 36;
const MOD37_2_ALPHABET = `${BLIND_CODE_ALPHABET}*`;

function valuesOf(text: string, what: string): number[] {
  const values: number[] = [];
  for (const ch of text) {
    const v = BLIND_CODE_ALPHABET.indexOf(ch);
    if (v < 0) throw new Error(`${what}: "${ch}" is not a digit or a capital letter A–Z`);
    values.push(v);
  }
  return values;
}

/**
 * The running value P of the hybrid system after the given characters:
 * P1 = M; for each character value a, S = (P + a) mod M with 0 read as M, then
 * P = 2S mod (M + 1).
 */
function hybridProduct(values: readonly number[]): number {
  let p = M;
  for (const a of values) {
    const s = (p + a) % M || M;
    p = (2 * s) % (M + 1);
  }
  return p;
}

/**
 * The ISO/IEC 7064 MOD 37,36 (hybrid) check character of a string: the character a whose
 * value makes (P + a) mod 36 = 1, where P is the running value after the string,
 * i.e. a = (37 - P) mod 36.
 *
 * Reference: ISO/IEC 7064:2003, hybrid system MOD 37,36.
 *
 * @param body the characters to protect: digits and capital letters, at least one
 * Not used for blind codes (it misses some adjacent transpositions; see above);
 * kept for reading identifiers that use it.
 *
 * @returns the check character (a digit or a capital letter)
 * @throws Error when the body is empty or holds another character
 */
export function mod3736CheckCharacter(body: string): string {
  if (typeof body !== "string" || body.length === 0) throw new Error("mod3736CheckCharacter: the string is empty");
  const p = hybridProduct(valuesOf(body, "mod3736CheckCharacter"));
  return BLIND_CODE_ALPHABET[(M + 1 - p) % M];
}

/**
 * Whether a string, its last character being the check character, satisfies
 * ISO/IEC 7064 MOD 37,36: running the hybrid system over all characters leaves
 * (P + a_last) mod 36 = 1.
 *
 * @param text digits and capital letters, check character last, at least two characters
 * @returns true when the check holds
 * @throws Error when the text is shorter than two characters or holds another character
 */
export function isValidMod3736(text: string): boolean {
  if (typeof text !== "string" || text.length < 2) throw new Error("isValidMod3736: a protected string has at least two characters");
  const values = valuesOf(text, "isValidMod3736");
  const last = values[values.length - 1];
  return (hybridProduct(values.slice(0, -1)) + last) % M === 1;
}

/**
 * The ISO/IEC 7064 MOD 37-2 check character of a string: with the check character at
 * position 1 (rightmost) and weights 2^(i-1), the weighted sum of all characters is
 * 1 modulo 37; i.e. check = (38 - (sum of a_j × 2^(n-j+1) mod 37)) mod 37, the value
 * 36 written "*".
 *
 * Reference: ISO/IEC 7064:2003, pure system MOD 37-2.
 *
 * @param body the characters to protect: digits and capital letters, at least one
 * @returns the check character: a digit, a capital letter or "*"
 * @throws Error when the body is empty or holds another character
 */
export function mod372CheckCharacter(body: string): string {
  if (typeof body !== "string" || body.length === 0) throw new Error("mod372CheckCharacter: the string is empty");
  let p = 0;
  for (const a of valuesOf(body, "mod372CheckCharacter")) p = ((p + a) * 2) % 37;
  return MOD37_2_ALPHABET[(38 - p) % 37];
}

/**
 * Whether a string, its last character being the check character (0–9, A–Z or "*"),
 * satisfies ISO/IEC 7064 MOD 37-2: the weighted sum is 1 modulo 37.
 *
 * @param text the protected string, check character last, at least two characters
 * @returns true when the check holds
 * @throws Error when the text is shorter than two characters or holds another character
 */
export function isValidMod372(text: string): boolean {
  if (typeof text !== "string" || text.length < 2) throw new Error("isValidMod372: a protected string has at least two characters");
  const check = MOD37_2_ALPHABET.indexOf(text[text.length - 1]);
  if (check < 0) throw new Error(`isValidMod372: "${text[text.length - 1]}" is not a check character`);
  let p = 0;
  for (const a of valuesOf(text.slice(0, -1), "isValidMod372")) p = ((p + a) * 2) % 37;
  return (p + check) % 37 === 1;
}

/**
 * Puts a typed or scanned code in its stored form: surrounding and inner spaces and
 * hyphens (and dashes) removed, letters in capitals.
 *
 * @param input what was typed or scanned
 * @returns the normalized text (not yet checked)
 */
export function normalizeBlindCode(input: string): string {
  return String(input).replace(/[\s\-\u2010-\u2015\u2212]/g, "").toUpperCase();
}

/** The result of reading back a code: the stored form, or why it is refused. */
export type BlindCodeCheck = { ok: true; code: string } | { ok: false; reason: string };

/**
 * Reads back a blind code typed or scanned at the bench: without regard to case,
 * ignoring spaces and hyphens; refuses it with a reason a tester can act on when it
 * is empty, has another character, has the wrong length, or its check character
 * (ISO/IEC 7064 MOD 37-2) does not match.
 *
 * @param input what was typed or scanned
 * @returns `{ ok: true, code }` with the code in stored form, or `{ ok: false, reason }`
 */
export function validateBlindCode(input: string): BlindCodeCheck {
  if (typeof input !== "string") return { ok: false, reason: "Enter the blind code from the label" };
  const code = normalizeBlindCode(input);
  if (code.length === 0) return { ok: false, reason: "Enter the blind code from the label" };
  for (const ch of code) {
    if (!BLIND_CODE_ALPHABET.includes(ch)) {
      return { ok: false, reason: `"${ch}" is not part of a blind code: codes have only the letters A–Z and the digits 0–9` };
    }
  }
  if (code.length !== BLIND_CODE_LENGTH) {
    return {
      ok: false,
      reason: `A blind code has ${BLIND_CODE_LENGTH} characters; this has ${code.length}: check the code on the label`,
    };
  }
  if (!isValidMod372(code)) return { ok: false, reason: "The last character does not match: check the code on the label" };
  return { ok: true, code };
}

/**
 * The code as printed and shown: two groups of three characters, e.g. "K7Q-2MP".
 *
 * @param code a code in any accepted form
 * @param separator what goes between the groups (default "-")
 * @returns the grouped code
 * @throws Error when the code is not a valid blind code
 */
export function formatBlindCode(code: string, separator = "-"): string {
  const check = validateBlindCode(code);
  if (!check.ok) throw new Error(`formatBlindCode: ${check.reason}`);
  return `${check.code.slice(0, 3)}${separator}${check.code.slice(3)}`;
}

/**
 * Draws blind codes from a seeded stream: each code is 5 characters uniform on the
 * 36 alphanumerics plus its MOD 37-2 check character; a body whose check would be
 * "*", or a code already in `existing` (compared in normalized form) or already
 * drawn, is discarded and drawn again.
 *
 * @param count how many codes, 0 .. MAX_BLIND_CODES
 * @param seed the seed (keep it apart from the schedule's seed and away from testers)
 * @param existing codes that must not be reused (e.g. every code of the lab)
 * @returns the codes in stored form, in the order drawn
 * @throws Error when the count is out of range, the seed is empty, or the codes cannot be made unique
 */
export function generateBlindCodes(count: number, seed: string, existing: Iterable<string> = []): string[] {
  if (!Number.isInteger(count) || count < 0 || count > MAX_BLIND_CODES) {
    throw new Error(`generateBlindCodes: the count must be a whole number from 0 to ${MAX_BLIND_CODES}, got ${count}`);
  }
  const source = createRandomSource(seed, "blind-codes");
  const taken = new Set<string>();
  for (const code of existing) taken.add(normalizeBlindCode(code));
  const out: string[] = [];
  let attempts = 0;
  while (out.length < count) {
    if (++attempts > count * 100 + 1000) {
      throw new Error("generateBlindCodes: could not draw enough unique codes (too many codes already exist)");
    }
    let body = "";
    for (let i = 0; i < BLIND_CODE_BODY_LENGTH; i++) body += BLIND_CODE_ALPHABET[randomInt(source, M)];
    const check = mod372CheckCharacter(body);
    if (check === "*") continue;
    const code = body + check;
    if (taken.has(code)) continue;
    taken.add(code);
    out.push(code);
  }
  return out;
}

/**
 * Gives each blade of a study its blind code. The codes are drawn first, from the
 * seed alone, and handed to the blades in sorted id order; since every code is drawn
 * independently of any blade, the code says nothing about the blade or its arm.
 *
 * @param bladeIds the study's blades (unique, non-empty ids)
 * @param seed the seed for the codes
 * @param existing codes already used in the lab
 * @returns one `{ bladeId, code }` per blade, in sorted blade id order
 * @throws Error when an id is empty or repeated, or as generateBlindCodes
 */
export function assignBlindCodes(
  bladeIds: readonly string[],
  seed: string,
  existing: Iterable<string> = [],
): { bladeId: string; code: string }[] {
  const seen = new Set<string>();
  for (const id of bladeIds) {
    if (typeof id !== "string" || id.length === 0) throw new Error("assignBlindCodes: every blade id must be a non-empty string");
    if (seen.has(id)) throw new Error(`assignBlindCodes: the blade "${id}" appears twice`);
    seen.add(id);
  }
  const sorted = bladeIds.slice().sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const codes = generateBlindCodes(sorted.length, seed, existing);
  return sorted.map((bladeId, i) => ({ bladeId, code: codes[i] }));
}

/**
 * An example code for pages and docs, built by the product's own check character so it
 * passes the check and is grouped as printed (e.g. exampleBlindCode("7KQ2M") = "7KQ-2MB").
 *
 * @throws Error when the body's check character would be "*" (pick another body)
 */
export function exampleBlindCode(body: string): string {
  return formatBlindCode(body + mod372CheckCharacter(body));
}
