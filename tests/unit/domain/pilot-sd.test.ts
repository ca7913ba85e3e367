import { describe, expect, it } from "vitest";
import { pooledSd } from "~/domain/pilot-sd.ts";

describe("pooledSd", () => {
  it("matches the pooled SD of Borenstein et al. (2009) ch. 4's example", () => {
    // Source: Borenstein, Hedges, Higgins & Rothstein (2009), Introduction to Meta-Analysis, ch. 4 (from memory,
    // as in docs/references.md): SDs 5.5 and 4.5 with n = 50 each give a pooled SD of 5.0249.
    const r = pooledSd([{ n: 50, sd: 5.5 }, { n: 50, sd: 4.5 }])!;
    expect(r.sd).toBeCloseTo(5.0249, 4);
    expect(r.blades).toBe(100);
  });

  it("weights groups by their degrees of freedom and skips groups of one", () => {
    // Hand-computed: sqrt((1·4 + 3·16) / (1 + 3)) = sqrt(13) = 3.6056
    expect(pooledSd([{ n: 2, sd: 2 }, { n: 4, sd: 4 }, { n: 1, sd: 100 }])!.sd).toBeCloseTo(Math.sqrt(13), 12);
    expect(pooledSd([{ n: 1, sd: 3 }])).toBeNull();
    expect(() => pooledSd([{ n: 3, sd: Number.NaN }])).toThrow(/finite/);
  });
});
