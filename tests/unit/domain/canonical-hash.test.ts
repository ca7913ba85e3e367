import { describe, expect, it } from "vitest";
import { canonicalHash, canonicalJson } from "~/domain/canonical-hash";

function fromIeee754Hex(hex: string): number {
  const view = new DataView(new ArrayBuffer(8));
  view.setBigUint64(0, BigInt(`0x${hex}`));
  return view.getFloat64(0);
}

const protocol = {
  name: "Rope test, three positions",
  checkEvery: 1,
  cap: 60,
  positions: ["heel", "middle", "tip"],
  stopRule: { thresholdGf: 400, confirmation: true },
  recipe: [{ abrasive: "aluminium oxide", grit: 400, anglePerSideDeg: 17.5, strokes: 20 }],
};

describe("canonical hash", () => {
  it("does not depend on key order or on how a number is written", () => {
    const reordered = JSON.parse(
      '{"stopRule":{"confirmation":true,"thresholdGf":400.0},"recipe":[{"strokes":2.0e1,"grit":400,"anglePerSideDeg":17.50,"abrasive":"aluminium oxide"}],"positions":["heel","middle","tip"],"name":"Rope test, three positions","cap":60.000,"checkEvery":1.0}',
    );
    expect(canonicalHash(reordered)).toBe(canonicalHash(protocol));
    expect(canonicalHash(JSON.parse("1.0"))).toBe(canonicalHash(1));
    expect(canonicalHash(JSON.parse('{"a":1.0,"b":1e0}'))).toBe(canonicalHash({ b: 1, a: 1 }));
  });

  it("changes when any field changes", () => {
    const base = canonicalHash(protocol);
    const variants = [
      { ...protocol, name: "Rope test, three positions." },
      { ...protocol, checkEvery: 2 },
      { ...protocol, cap: 61 },
      { ...protocol, positions: ["heel", "tip", "middle"] },
      { ...protocol, stopRule: { thresholdGf: 400.5, confirmation: true } },
      { ...protocol, stopRule: { thresholdGf: 400, confirmation: false } },
      { ...protocol, recipe: [{ ...protocol.recipe[0], grit: 600 }] },
      { ...protocol, extra: null },
    ];
    const hashes = variants.map(canonicalHash);
    for (const h of hashes) expect(h).not.toBe(base);
    expect(new Set(hashes).size).toBe(variants.length);
  });

  it("is SHA-256 as 64 hex digits", () => {
    // Source: SHA-256 of the two bytes "{}" (from memory; the same value from
    // Node's OpenSSL-backed crypto when this test was written).
    expect(canonicalHash({})).toBe("44136fa355b3678a1146ad16f7e8649e94fb4fc21fe77e8310c060f61caaff8a");
    expect(canonicalHash(protocol)).toMatch(/^[0-9a-f]{64}$/);
  });

  it("refuses values that are not JSON, naming where", () => {
    expect(() => canonicalHash({ a: undefined })).toThrow(/\$\.a is undefined/);
    expect(() => canonicalHash({ a: [1, Number.NaN] })).toThrow(/\$\.a\[1\] is NaN/);
    expect(() => canonicalHash({ when: new Date(0) })).toThrow(/not a plain object/);
    const cycle: Record<string, unknown> = {};
    cycle.self = cycle;
    expect(() => canonicalHash(cycle)).toThrow(/refers back to itself/);
  });
});

describe("RFC 8785 examples", () => {
  // Source: RFC 8785 (JSON Canonicalization Scheme), Appendix B, "Number
  // Serialization Samples": IEEE 754 bit patterns and their canonical text. The
  // values were taken from several public test suites that quote the appendix
  // (they agree with each other), not read from the RFC's own text here.
  it.each([
    ["0000000000000000", "0"],
    ["8000000000000000", "0"],
    ["0000000000000001", "5e-324"],
    ["8000000000000001", "-5e-324"],
    ["7fefffffffffffff", "1.7976931348623157e+308"],
    ["ffefffffffffffff", "-1.7976931348623157e+308"],
    ["4340000000000000", "9007199254740992"],
    ["c340000000000000", "-9007199254740992"],
    ["4430000000000000", "295147905179352830000"],
    ["44b52d02c7e14af5", "9.999999999999997e+22"],
    ["44b52d02c7e14af6", "1e+23"],
    ["44b52d02c7e14af7", "1.0000000000000001e+23"],
    ["444b1ae4d6e2ef4e", "999999999999999700000"],
    ["444b1ae4d6e2ef4f", "999999999999999900000"],
    ["444b1ae4d6e2ef50", "1e+21"],
    ["3eb0c6f7a0b5ed8c", "9.999999999999997e-7"],
    ["3eb0c6f7a0b5ed8d", "0.000001"],
    ["41b3de4355555553", "333333333.3333332"],
    ["41b3de4355555554", "333333333.33333325"],
    ["41b3de4355555555", "333333333.3333333"],
    ["41b3de4355555556", "333333333.3333334"],
    ["41b3de4355555557", "333333333.33333343"],
    ["becbf647612f3696", "-0.0000033333333333333333"],
  ])("%s -> %s", (hex, text) => {
    expect(canonicalJson(fromIeee754Hex(hex))).toBe(text);
  });

  it("NaN and Infinity (Appendix B: no canonical form) are refused", () => {
    expect(() => canonicalJson(fromIeee754Hex("7fffffffffffffff"))).toThrow(/NaN/);
    expect(() => canonicalJson(fromIeee754Hex("7ff0000000000000"))).toThrow(/Infinity/);
  });

  it("the RFC authors' published 'values' test case", () => {
    // Source: the RFC 8785 authors' test data, repository cyberphone/json-canonicalization,
    // testdata/input/values.json and testdata/output/values.json.
    const input = JSON.parse(
      '{\n  "numbers": [1E30, 4.50, 333333333.33333329, 2e-3, 0.000000000000000000000000001],\n  "escaping": "\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/",\n  "literals": [null, true, false]\n}',
    );
    expect(canonicalJson(input)).toBe(
      '{"escaping":"\u20ac$\\u000f\\nA\'B\\"\\\\\\\\\\"/","literals":[null,true,false],"numbers":[1e+30,4.5,333333333.3333333,0.002,1e-27]}',
    );
  });
});
