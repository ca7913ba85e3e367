import { describe, expect, it } from "vitest";
import fc from "fast-check";
import jStat from "jstat";
import { readFileSync } from "node:fs";
import {
  RANDOMIZATION_ALGORITHM_VERSION,
  balanceSummary,
  createRandomSource,
  generateSchedule,
  randomInt,
  shuffle,
  verifySchedule,
  williamsSequences,
  type RandomizationDesign,
  type Schedule,
} from "~/domain/randomization";

const fixture = (name: string) => JSON.parse(readFileSync(new URL(`./fixtures/${name}`, import.meta.url), "utf8"));

/** Chi-square goodness-of-fit test of observed counts against equal expected counts (Pearson 1900). */
function chiSquareUniformP(counts: number[]): number {
  const total = counts.reduce((a, b) => a + b, 0);
  const expected = total / counts.length;
  const statistic = counts.reduce((a, o) => a + (o - expected) ** 2 / expected, 0);
  return 1 - jStat.chisquare.cdf(statistic, counts.length - 1);
}

function parallelDesign(over: Partial<RandomizationDesign> = {}): RandomizationDesign {
  return {
    kind: "parallel",
    arms: [{ id: "arm-x" }, { id: "arm-y" }, { id: "arm-z" }],
    blades: Array.from({ length: 12 }, (_, i) => ({ id: `b${String(i + 1).padStart(2, "0")}`, armId: ["arm-x", "arm-y", "arm-z"][i % 3] })),
    testerIds: ["t1", "t2"],
    replicates: 1,
    method: "complete",
    stratifyByTester: false,
    sittingLength: 6,
    seed: "s",
    ...over,
  };
}

function reverseKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reverseKeys);
  if (value && typeof value === "object") {
    return Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, reverseKeys(v)]));
  }
  return value;
}

describe("determinism: committed fixtures and golden schedules", () => {
  // The golden files were generated once by randomization algorithm version 1 and
  // committed. They must never change for version 1: a difference means version 1
  // no longer regenerates old schedules. A deliberate change of the algorithm gets
  // a new version number and golden files of its own; these stay as they are.
  for (const name of ["parallel", "within-blade"]) {
    const design = fixture(`randomization-design-${name}.json`) as RandomizationDesign;
    const golden = fixture(`randomization-golden-${name}.v1.json`) as Schedule;

    it(`${name}: the fixture design and seed give exactly the golden schedule`, () => {
      expect(golden.algorithmVersion).toBe(1);
      expect(generateSchedule(design, 1)).toStrictEqual(golden);
    });

    it(`${name}: the same on a second call and after a JSON round trip`, () => {
      const first = generateSchedule(design);
      const second = generateSchedule(design);
      expect(second).toStrictEqual(first);
      const roundTripped = generateSchedule(JSON.parse(JSON.stringify(design)));
      expect(roundTripped).toStrictEqual(first);
      expect(JSON.parse(JSON.stringify(first))).toStrictEqual(first);
    });

    it(`${name}: verifySchedule accepts the golden schedule, in any key order, and refuses an edited one`, () => {
      expect(verifySchedule(design, golden)).toBe(true);
      expect(verifySchedule(design, reverseKeys(golden) as Schedule)).toBe(true);
      const edited = structuredClone(golden);
      [edited.runs[0].testerId, edited.runs[1].testerId] = ["tester-x", edited.runs[0].testerId];
      expect(verifySchedule(design, edited)).toBe(false);
    });
  }

  it("does not depend on the order the ids are listed in", () => {
    const design = fixture("randomization-design-parallel.json") as RandomizationDesign;
    const reordered: RandomizationDesign = {
      ...design,
      arms: design.arms!.slice().reverse(),
      blades: design.blades.slice().reverse(),
      testerIds: design.testerIds.slice().reverse(),
      blockSizes: design.blockSizes!.slice().reverse(),
    };
    expect(generateSchedule(reordered)).toStrictEqual(generateSchedule(design));
  });

  it("records seed, generator and version, and another seed gives another schedule", () => {
    const a = generateSchedule(parallelDesign({ seed: "one" }));
    const b = generateSchedule(parallelDesign({ seed: "two" }));
    expect(a.seed).toBe("one");
    expect(a.algorithmVersion).toBe(RANDOMIZATION_ALGORITHM_VERSION);
    expect(a.prng).toMatch(/seedrandom 3\.0\.5.*ARC4/);
    expect(b.runs.map((r) => r.bladeId)).not.toEqual(a.runs.map((r) => r.bladeId));
  });

  it("refuses an unknown algorithm version", () => {
    expect(() => generateSchedule(parallelDesign(), 2)).toThrow(/version 2 is not known/);
  });

  it("draws the same integers from the same seed and purpose, and others from another purpose", () => {
    const draw = (purpose: string) => {
      const s = createRandomSource("seed", purpose);
      return Array.from({ length: 20 }, () => randomInt(s, 1000));
    };
    expect(draw("order")).toEqual(draw("order"));
    expect(draw("order")).not.toEqual(draw("labels"));
    const s = createRandomSource("seed", "x");
    for (let i = 0; i < 1000; i++) {
      const r = randomInt(s, 7);
      expect(Number.isInteger(r) && r >= 0 && r < 7).toBe(true);
    }
    expect(shuffle(createRandomSource("seed", "x"), [1, 2, 3, 4, 5]).slice().sort()).toEqual([1, 2, 3, 4, 5]);
  });
});

describe("schedule structure", () => {
  it("parallel: runs = blades × replicates, replicates numbered in run order", () => {
    const s = generateSchedule(parallelDesign({ replicates: 3 }));
    expect(s.runs).toHaveLength(36);
    expect(s.runs.map((r) => r.position)).toEqual(Array.from({ length: 36 }, (_, i) => i + 1));
    for (let b = 1; b <= 12; b++) {
      const mine = s.runs.filter((r) => r.bladeId === `b${String(b).padStart(2, "0")}`);
      expect(mine.map((r) => r.replicate)).toEqual([1, 2, 3]);
      expect(mine.map((r) => r.bladeRunNumber)).toEqual([1, 2, 3]);
      expect(new Set(mine.map((r) => r.armId)).size).toBe(1);
      expect(mine.every((r) => r.conditionId === null)).toBe(true);
    }
  });

  it("within-blade: runs = blades × conditions × replicates, each round back to back with one tester", () => {
    const s = generateSchedule({
      kind: "within-blade",
      conditions: [{ id: "c1" }, { id: "c2" }, { id: "c3" }],
      blades: Array.from({ length: 7 }, (_, i) => ({ id: `w${i}` })),
      testerIds: ["t1", "t2", "t3"],
      replicates: 2,
      method: "complete",
      stratifyByTester: false,
      sittingLength: 5,
      seed: "w",
    });
    expect(s.runs).toHaveLength(7 * 3 * 2);
    for (let i = 0; i < s.runs.length; i += 3) {
      const round = s.runs.slice(i, i + 3);
      expect(new Set(round.map((r) => r.bladeId)).size).toBe(1);
      expect(new Set(round.map((r) => r.testerId)).size).toBe(1);
      expect(new Set(round.map((r) => r.sitting)).size).toBe(1);
      expect(round.map((r) => r.conditionId).slice().sort()).toEqual(["c1", "c2", "c3"]);
      const seq = s.conditionSequences.find((c) => c.bladeId === round[0].bladeId && c.replicate === round[0].replicate)!;
      expect(round.map((r) => r.conditionId)).toEqual(seq.conditionIds);
      expect(round.every((r) => r.armId === null)).toBe(true);
    }
    // One wave per replicate: every replicate-1 run comes before any replicate-2 run.
    const lastOfFirst = Math.max(...s.runs.filter((r) => r.replicate === 1).map((r) => r.position));
    const firstOfSecond = Math.min(...s.runs.filter((r) => r.replicate === 2).map((r) => r.position));
    expect(lastOfFirst).toBeLessThan(firstOfSecond);
  });

  it("neutral names are Arm A, Arm B, ... and are not given in creation order", () => {
    const s = generateSchedule(parallelDesign());
    expect(s.neutralLabels.map((l) => l.label)).toEqual(["Arm A", "Arm B", "Arm C"]);
    expect(s.neutralLabels.map((l) => l.id).slice().sort()).toEqual(["arm-x", "arm-y", "arm-z"]);
    const firstNamedA = new Set<string>();
    for (let i = 0; i < 40; i++) firstNamedA.add(generateSchedule(parallelDesign({ seed: `n${i}` })).neutralLabels[0].id);
    expect(firstNamedA.size).toBe(3);
  });

  it("sittings hold at most the sitting length, per tester, numbered from 1 without gaps", () => {
    const s = generateSchedule(parallelDesign({ replicates: 2, sittingLength: 5 }));
    for (const t of ["t1", "t2"]) {
      const mine = s.runs.filter((r) => r.testerId === t);
      const sittings = mine.map((r) => r.sitting);
      expect(sittings).toEqual(mine.map((_, i) => Math.floor(i / 5) + 1));
    }
  });
});

const arbParallel = fc
  .record({
    arms: fc.integer({ min: 2, max: 4 }),
    bladesPerArm: fc.integer({ min: 1, max: 6 }),
    testers: fc.integer({ min: 1, max: 4 }),
    replicates: fc.integer({ min: 1, max: 3 }),
    blockMultiples: fc.uniqueArray(fc.integer({ min: 1, max: 4 }), { minLength: 1, maxLength: 3 }),
    sittingLength: fc.integer({ min: 1, max: 10 }),
    seed: fc.string({ maxLength: 12 }).map((s) => `seed-${s}`),
  })
  .map(
    (p): RandomizationDesign => ({
      kind: "parallel",
      arms: Array.from({ length: p.arms }, (_, i) => ({ id: `arm${i}` })),
      blades: Array.from({ length: p.arms * p.bladesPerArm }, (_, i) => ({ id: `blade${i}`, armId: `arm${i % p.arms}` })),
      testerIds: Array.from({ length: p.testers }, (_, i) => `tester${i}`),
      replicates: p.replicates,
      method: "permuted-blocks",
      blockSizes: p.blockMultiples.map((m) => m * p.arms),
      stratifyByTester: false,
      sittingLength: p.sittingLength,
      seed: p.seed,
    }),
  );

describe("balance", () => {
  it("every permuted block holds each arm equally often, with an allowed size or the remainder last", () => {
    fc.assert(
      fc.property(arbParallel, (design) => {
        const s = generateSchedule(design);
        const k = design.arms!.length;
        const blocks = [...new Set(s.runs.map((r) => r.block))];
        expect(blocks.every((b) => typeof b === "number")).toBe(true);
        blocks.forEach((b, i) => {
          const runs = s.runs.filter((r) => r.block === b);
          // a block is one stretch of the run order
          expect(runs[runs.length - 1].position - runs[0].position + 1).toBe(runs.length);
          const perArm = design.arms!.map((a) => runs.filter((r) => r.armId === a.id).length);
          expect(new Set(perArm).size).toBe(1);
          expect(runs.length % k).toBe(0);
          if (i < blocks.length - 1) expect(design.blockSizes).toContain(runs.length);
        });
      }),
      { numRuns: 150 },
    );
  });

  it("each tester gets every arm equally often within one (unstratified and stratified), and tester totals differ by at most one", () => {
    fc.assert(
      fc.property(arbParallel, fc.boolean(), fc.boolean(), (design, blocks, stratify) => {
        const d: RandomizationDesign = {
          ...design,
          method: blocks ? "permuted-blocks" : "complete",
          blockSizes: blocks ? design.blockSizes : undefined,
          stratifyByTester: stratify,
        };
        let s: Schedule;
        try {
          s = generateSchedule(d);
        } catch (e) {
          // Stratified permuted blocks refuse strata that cannot hold every arm equally.
          expect(stratify && blocks).toBe(true);
          expect(String(e)).toMatch(/same number of runs in every arm for tester/);
          return;
        }
        const summary = balanceSummary(s);
        expect(summary.maxTesterSpread).toBeLessThanOrEqual(1);
        const totals = summary.byTester.map((t) => t.runs);
        if (totals.length === design.testerIds.length) expect(Math.max(...totals) - Math.min(...totals)).toBeLessThanOrEqual(1);
        expect(summary.cells.reduce((a, c) => a + c.runs, 0)).toBe(s.runs.length);
      }),
      { numRuns: 200 },
    );
  });

  it("stratified permuted blocks: each block belongs to one tester and holds every arm equally", () => {
    const s = generateSchedule(
      parallelDesign({ method: "permuted-blocks", blockSizes: [3, 6], stratifyByTester: true, replicates: 2 }),
    );
    for (const b of new Set(s.runs.map((r) => r.block))) {
      const runs = s.runs.filter((r) => r.block === b);
      expect(new Set(runs.map((r) => r.testerId)).size).toBe(1);
      const perArm = ["arm-x", "arm-y", "arm-z"].map((a) => runs.filter((r) => r.armId === a).length);
      expect(new Set(perArm).size).toBe(1);
    }
  });

  it("within-blade, two conditions: AB and BA counts differ by at most one, per replicate and overall", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 15 }), fc.integer({ min: 1, max: 3 }), fc.string().map((s) => `seed-${s}`), (n, r, seed) => {
        const s = generateSchedule({
          kind: "within-blade",
          conditions: [{ id: "fine" }, { id: "coarse" }],
          blades: Array.from({ length: n }, (_, i) => ({ id: `b${i}` })),
          testerIds: ["t1"],
          replicates: r,
          method: "complete",
          stratifyByTester: false,
          sittingLength: 4,
          seed,
        });
        const count = (seqs: typeof s.conditionSequences) => {
          const ab = seqs.filter((c) => c.conditionIds.join() === "fine,coarse").length;
          return [ab, seqs.length - ab];
        };
        for (let rep = 1; rep <= r; rep++) {
          const [ab, ba] = count(s.conditionSequences.filter((c) => c.replicate === rep));
          expect(Math.abs(ab - ba)).toBeLessThanOrEqual(1);
        }
        const [ab, ba] = count(s.conditionSequences);
        expect(Math.abs(ab - ba)).toBeLessThanOrEqual(1);
      }),
      { numRuns: 100 },
    );
  });

  it("within-blade, k conditions: the Williams orders are used with counts differing by at most one", () => {
    for (const k of [3, 4, 5]) {
      const conditions = Array.from({ length: k }, (_, i) => ({ id: `c${i}` }));
      const s = generateSchedule({
        kind: "within-blade",
        conditions,
        blades: Array.from({ length: 23 }, (_, i) => ({ id: `b${i}` })),
        testerIds: ["t1", "t2"],
        replicates: 1,
        method: "complete",
        stratifyByTester: false,
        sittingLength: 10,
        seed: `k${k}`,
      });
      const counts = new Map<string, number>();
      for (const c of s.conditionSequences) counts.set(c.conditionIds.join(), (counts.get(c.conditionIds.join()) ?? 0) + 1);
      const rows = k % 2 === 0 ? k : 2 * k;
      expect(counts.size).toBe(rows);
      const values = [...counts.values()];
      expect(Math.max(...values) - Math.min(...values)).toBeLessThanOrEqual(1);
      // Each tester gets every condition equally often (every round holds each once).
      expect(balanceSummary(s).maxTesterSpread).toBe(0);
    }
  });

  it("within-blade permuted blocks hold every condition order equally often", () => {
    const design = fixture("randomization-design-within-blade.json") as RandomizationDesign;
    const s = generateSchedule(design);
    for (const b of new Set(s.runs.map((r) => r.block))) {
      const runs = s.runs.filter((r) => r.block === b);
      const firsts = runs.filter((r) => r.bladeRunNumber % 2 === 1).map((r) => r.conditionId);
      expect(firsts.filter((c) => c === "cond-polished").length).toBe(firsts.length / 2);
    }
  });
});

describe("Williams (1949) designs", () => {
  // Source: Williams, E. J. (1949), Aust. J. Sci. Res. A 2:149-168 — the property
  // that defines the design: each row a permutation, each condition once in every
  // period, and each ordered pair of different conditions adjacent equally often.
  it("k = 2 gives AB and BA", () => {
    expect(williamsSequences(2)).toEqual([
      [0, 1],
      [1, 0],
    ]);
  });
  for (const k of [2, 3, 4, 5, 6, 7, 8]) {
    it(`k = ${k}: rows, periods and first-order carry-over are balanced`, () => {
      const rows = williamsSequences(k);
      expect(rows).toHaveLength(k % 2 === 0 ? k : 2 * k);
      for (const row of rows) expect(row.slice().sort((a, b) => a - b)).toEqual(Array.from({ length: k }, (_, i) => i));
      for (let p = 0; p < k; p++) {
        const counts = new Array(k).fill(0);
        for (const row of rows) counts[row[p]]++;
        expect(new Set(counts).size).toBe(1);
      }
      const pairs = new Map<string, number>();
      for (const row of rows) for (let p = 0; p + 1 < k; p++) pairs.set(`${row[p]}>${row[p + 1]}`, (pairs.get(`${row[p]}>${row[p + 1]}`) ?? 0) + 1);
      expect(pairs.size).toBe(k * (k - 1));
      expect(new Set(pairs.values()).size).toBe(1);
    });
  }
  it("refuses fewer than two conditions", () => {
    expect(() => williamsSequences(1)).toThrow(/from 2 to 26/);
  });
});

describe("fairness over 2,000 seeds (Pearson chi-square goodness-of-fit against uniform, alpha 0.001)", () => {
  const SEEDS = 2000;
  for (const method of ["complete", "permuted-blocks"] as const) {
    it(`${method}: the arm of the first run and the position of a given blade are uniform`, () => {
      const firstArm = new Map<string, number>([["arm-x", 0], ["arm-y", 0], ["arm-z", 0]]);
      const position = new Array(12).fill(0);
      for (let i = 0; i < SEEDS; i++) {
        const s = generateSchedule(
          parallelDesign({ seed: `fairness-${i}`, method, blockSizes: method === "permuted-blocks" ? [3, 6] : undefined }),
        );
        firstArm.set(s.runs[0].armId!, firstArm.get(s.runs[0].armId!)! + 1);
        position[s.runs.find((r) => r.bladeId === "b01")!.position - 1]++;
      }
      expect(chiSquareUniformP([...firstArm.values()])).toBeGreaterThan(0.001);
      expect(chiSquareUniformP(position)).toBeGreaterThan(0.001);
    });
  }

  it("the chi-square check can fail: a biased count is rejected", () => {
    expect(chiSquareUniformP([800, 600, 600])).toBeLessThan(0.001);
  });
});

describe("invalid designs throw a clear error", () => {
  const cases: [string, Partial<RandomizationDesign>, RegExp][] = [
    ["no seed", { seed: "" }, /needs a seed/],
    ["one arm", { arms: [{ id: "arm-x" }], blades: [{ id: "b", armId: "arm-x" }] }, /at least two arms/],
    ["unknown arm", { blades: [{ id: "b", armId: "nope" }, { id: "c", armId: "arm-x" }] }, /unknown arm "nope"/],
    ["arm without blades", { blades: [{ id: "b", armId: "arm-x" }, { id: "c", armId: "arm-y" }] }, /Arm "arm-z" has no blades/],
    ["duplicate blade", { blades: [{ id: "b", armId: "arm-x" }, { id: "b", armId: "arm-y" }] }, /"b" appears twice/],
    ["no testers", { testerIds: [] }, /at least one tester/],
    ["zero replicates", { replicates: 0 }, /Replicates must be a whole number/],
    ["block size not a multiple", { method: "permuted-blocks", blockSizes: [4] }, /not a multiple of the number of arms \(3\)/],
    ["blocks without sizes", { method: "permuted-blocks" }, /at least one block size/],
    ["sitting length 0", { sittingLength: 0 }, /sitting length/],
  ];
  for (const [name, over, message] of cases) {
    it(name, () => expect(() => generateSchedule(parallelDesign(over))).toThrow(message));
  }
  it("unequal arms with permuted blocks", () => {
    const d = parallelDesign({ method: "permuted-blocks", blockSizes: [3] });
    d.blades = [...d.blades, { id: "extra", armId: "arm-x" }];
    expect(() => generateSchedule(d)).toThrow(/same number of runs in every arm/);
  });
});
