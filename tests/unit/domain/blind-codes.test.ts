import { describe, expect, it } from "vitest";
import jStat from "jstat";
import {
  BLIND_CODE_ALPHABET,
  BLIND_CODE_LENGTH,
  assignBlindCodes,
  formatBlindCode,
  generateBlindCodes,
  isValidMod372,
  isValidMod3736,
  mod372CheckCharacter,
  mod3736CheckCharacter,
  normalizeBlindCode,
  validateBlindCode,
} from "~/domain/blind-codes";

describe("ISO/IEC 7064 MOD 37-2 (the blind codes' check) published example", () => {
  // Source: ISBT 128 (UK Blood Transfusion Services, "Red Book", Annex 2, ISBT 128
  // check character calculation, table A2.2, transfusionguidelines.org): donation
  // number G123 498 654 321 has the ISO 7064 MOD 37-2 checksum 17, eye-readable "H".
  it("G123498654321 -> H", () => {
    expect(mod372CheckCharacter("G123498654321")).toBe("H");
    expect(isValidMod372("G123498654321H")).toBe(true);
    expect(isValidMod372("G123498654321J")).toBe(false);
  });
  it("can give the supplementary check character *, which blind codes never use", () => {
    const bodies = generateBlindCodes(200, "star").map((c) => c.slice(0, 5));
    expect(bodies.every((b) => mod372CheckCharacter(b) !== "*")).toBe(true);
    // some body needs "*": the check values 0..36 are all reachable
    let found = false;
    for (let i = 0; i < 37 * 36 && !found; i++) found = mod372CheckCharacter(`AB${BLIND_CODE_ALPHABET[Math.floor(i / 36) % 36]}${BLIND_CODE_ALPHABET[i % 36]}`) === "*";
    expect(found).toBe(true);
  });
});

describe("ISO/IEC 7064 MOD 37,36 (hybrid) published examples", () => {
  // Source: the Global Release Identifier (GRid) standard's example identifier
  // A1-2425G-ABC1234002-M, whose check character is ISO/IEC 7064 MOD 37,36; the same
  // values, with 123AB -> X and DADPIDA3897722461 -> J, are listed as examples of an
  // "ISO 7064 Mod. 37/36" checksum function in a vendor's manual
  // (lobster-world.com, docs "checksum ISO 7064 Mod. 37/36").
  // The text of ISO/IEC 7064:2003 itself was not at hand, so its own annex examples
  // could not be confirmed here.
  it.each([
    ["A12425GABC1234002", "M"],
    ["123AB", "X"],
    ["DADPIDA3897722461", "J"],
  ])("%s -> %s", (body, check) => {
    expect(mod3736CheckCharacter(body)).toBe(check);
    expect(isValidMod3736(body + check)).toBe(true);
  });

  it("the GRid example with a wrong check character fails", () => {
    expect(isValidMod3736("A12425GABC1234002N")).toBe(false);
  });

  it("misses some swaps of neighbours, which is why blind codes use MOD 37-2", () => {
    // I = 18: from the start value 36, 36 + 18 = 54 ≡ 18 (mod 36) and 2 × 18 = 36 (mod 37)
    // returns the chain to its start, so "IJ" and "JI" leave the same running value.
    const body = "IJ7K5";
    const swapped = "JI7K5";
    expect(mod3736CheckCharacter(body)).toBe(mod3736CheckCharacter(swapped));
    expect(mod372CheckCharacter(body)).not.toBe(mod372CheckCharacter(swapped));
  });

  it("refuses characters outside 0-9 A-Z", () => {
    expect(() => mod3736CheckCharacter("AB*")).toThrow(/"\*" is not a digit or a capital letter/);
    expect(() => mod3736CheckCharacter("")).toThrow(/empty/);
  });
});

describe("generated codes", () => {
  const codes = generateBlindCodes(1000, "sample-of-1000");

  it("are 6 characters, all valid, unique, and the same for the same seed", () => {
    expect(codes).toHaveLength(1000);
    expect(new Set(codes).size).toBe(1000);
    for (const c of codes) {
      expect(c).toMatch(/^[0-9A-Z]{6}$/);
      expect(isValidMod372(c)).toBe(true);
    }
    expect(generateBlindCodes(1000, "sample-of-1000")).toEqual(codes);
    expect(generateBlindCodes(10, "another seed")).not.toEqual(codes.slice(0, 10));
  });

  it("every single-character substitution of each of 1,000 codes fails the check", () => {
    let tried = 0;
    for (const c of codes) {
      for (let i = 0; i < c.length; i++) {
        for (const ch of BLIND_CODE_ALPHABET) {
          if (ch === c[i]) continue;
          const wrong = c.slice(0, i) + ch + c.slice(i + 1);
          // one expect per code keeps 210,000 checks fast
          if (isValidMod372(wrong)) expect.fail(`${wrong} (from ${c}) passes the check`);
          tried++;
        }
      }
    }
    expect(tried).toBe(1000 * 6 * 35);
    expect(validateBlindCode(codes[0].slice(0, 2) + (codes[0][2] === "A" ? "B" : "A") + codes[0].slice(3)).ok).toBe(false);
  }, 30_000);

  it("every adjacent transposition (of two different characters) of each of 1,000 codes fails the check", () => {
    let tried = 0;
    for (const c of codes) {
      for (let i = 0; i + 1 < c.length; i++) {
        if (c[i] === c[i + 1]) continue;
        const swapped = c.slice(0, i) + c[i + 1] + c[i] + c.slice(i + 2);
        if (isValidMod372(swapped)) expect.fail(`${swapped} (from ${c}) passes the check`);
        tried++;
      }
    }
    expect(tried).toBeGreaterThan(4500);
  });

  it("avoid codes that already exist (in any case or grouping)", () => {
    const first = generateBlindCodes(5, "collide");
    const existing = [formatBlindCode(first[0]).toLowerCase(), first[2]];
    const again = generateBlindCodes(5, "collide", existing);
    expect(again).not.toContain(first[0]);
    expect(again).not.toContain(first[2]);
    expect(new Set(again).size).toBe(5);
  });

  it("draw each body character uniformly (Pearson chi-square goodness-of-fit, alpha 0.001)", () => {
    const many = generateBlindCodes(7200, "uniformity");
    for (let pos = 0; pos < 5; pos++) {
      const counts = new Array(36).fill(0);
      for (const c of many) counts[BLIND_CODE_ALPHABET.indexOf(c[pos])]++;
      const expected = many.length / 36;
      const x2 = counts.reduce((a, o) => a + (o - expected) ** 2 / expected, 0);
      expect(1 - jStat.chisquare.cdf(x2, 35)).toBeGreaterThan(0.001);
    }
  });

  it("assignBlindCodes gives one code per blade, from the seed alone", () => {
    const a = assignBlindCodes(["blade-b", "blade-a", "blade-c"], "study-seed");
    expect(a.map((x) => x.bladeId)).toEqual(["blade-a", "blade-b", "blade-c"]);
    expect(a.map((x) => x.code)).toEqual(generateBlindCodes(3, "study-seed"));
    expect(() => assignBlindCodes(["x", "x"], "s")).toThrow(/appears twice/);
    expect(() => generateBlindCodes(-1, "s")).toThrow(/whole number/);
    expect(() => generateBlindCodes(1, "")).toThrow(/non-empty/);
  });
});

describe("reading a code back", () => {
  const code = generateBlindCodes(1, "read-back")[0];

  it("ignores case, spaces and hyphens", () => {
    const typed = `  ${code.slice(0, 3).toLowerCase()} - ${code.slice(3)} `;
    expect(normalizeBlindCode(typed)).toBe(code);
    expect(validateBlindCode(typed)).toEqual({ ok: true, code });
    expect(validateBlindCode(formatBlindCode(code))).toEqual({ ok: true, code });
  });

  it("gives a reason a tester can act on", () => {
    const wrongLast = code.slice(0, 5) + (code[5] === "0" ? "1" : "0");
    expect(validateBlindCode(wrongLast)).toEqual({ ok: false, reason: "The last character does not match: check the code on the label" });
    expect(validateBlindCode("")).toEqual({ ok: false, reason: "Enter the blind code from the label" });
    const short = validateBlindCode(code.slice(0, 4));
    expect(short.ok).toBe(false);
    if (!short.ok) expect(short.reason).toMatch(/has 6 characters; this has 4/);
    const odd = validateBlindCode(code.slice(0, 5) + "#");
    if (!odd.ok) expect(odd.reason).toMatch(/"#" is not part of a blind code/);
    expect(odd.ok).toBe(false);
  });

  it("formats the code in two groups of three", () => {
    expect(formatBlindCode(code)).toBe(`${code.slice(0, 3)}-${code.slice(3)}`);
    expect(formatBlindCode(code, " ")).toHaveLength(BLIND_CODE_LENGTH + 1);
    expect(() => formatBlindCode("ABCDEF0")).toThrow(/formatBlindCode/);
  });
});
