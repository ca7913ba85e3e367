// Example blind codes on the landing page and in the docs must pass the product's own
// check (ISO/IEC 7064 MOD 37-2) and use the printed grouping, three and three.
import { describe, expect, it } from "vitest";
import { readFileSync, readdirSync } from "node:fs";
import path from "node:path";
import { exampleBlindCode, formatBlindCode, mod372CheckCharacter, validateBlindCode } from "~/domain/blind-codes.ts";

const root = path.resolve(import.meta.dirname, "../../..");

describe("example blind codes", () => {
  it("exampleBlindCode appends the MOD 37-2 check character and groups as printed", () => {
    // Source: ISO/IEC 7064:2003 MOD 37-2 as implemented by mod372CheckCharacter (itself checked in tests/unit/domain).
    expect(exampleBlindCode("7KQ2M")).toBe(formatBlindCode(`7KQ2M${mod372CheckCharacter("7KQ2M")}`));
    expect(exampleBlindCode("7KQ2M")).toMatch(/^[0-9A-Z]{3}-[0-9A-Z]{3}$/);
    expect(validateBlindCode(exampleBlindCode("K7Q2M")).ok).toBe(true);
  });

  it("a mistyped example fails the check, so the test can fail", () => {
    const good = exampleBlindCode("7KQ2M");
    const bad = good.slice(0, -1) + (good.endsWith("A") ? "B" : "A");
    expect(validateBlindCode(bad).ok).toBe(false);
  });

  it("every code written as a code in the docs, README and the landing page passes the check", () => {
    const files = [path.join(root, "README.md"), ...readdirSync(path.join(root, "docs")).filter((f) => f.endsWith(".md")).map((f) => path.join(root, "docs", f))];
    const codes: string[] = [];
    for (const f of files) for (const m of readFileSync(f, "utf8").matchAll(/`([0-9A-Z]{3}-[0-9A-Z]{3})`/g)) codes.push(m[1]);
    expect(codes.length).toBeGreaterThan(0);
    for (const c of codes) expect(validateBlindCode(c), c).toMatchObject({ ok: true });
    const landing = readFileSync(path.join(root, "app/routes/home.tsx"), "utf8");
    expect(landing).toContain("exampleBlindCode(");
    expect(landing).not.toMatch(/BLADE [0-9A-Z]{4,}/);
  });
});
