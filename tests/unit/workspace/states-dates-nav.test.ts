import { describe, expect, it } from "vitest";
import { STATE_LOOKS, stateLook } from "~/lib/states.ts";
import { formatDate, formatDateTime } from "~/lib/dates.ts";
import { currentPlace, labNavItems } from "~/components/lab-nav.tsx";
import { breadcrumbs } from "~/components/breadcrumbs.tsx";
import { runState, studyState } from "~/server/db/schema/studies.ts";
import { CALIBRATION_STATE_LABELS } from "~/domain/calibration.ts";

const LAB = "11111111-1111-4111-8111-111111111111";
const STUDY = "22222222-2222-4222-8222-222222222222";

describe("one shape and one word per state", () => {
  it("covers every study and run state and every calibration state", () => {
    for (const s of studyState.enumValues) expect(stateLook("study", s).word.length).toBeGreaterThan(0);
    for (const s of runState.enumValues) expect(stateLook("run", s).word.length).toBeGreaterThan(0);
    for (const [s, word] of Object.entries(CALIBRATION_STATE_LABELS)) expect(stateLook("calibration", s).word).toBe(word);
    expect(() => stateLook("study", "nonsense")).toThrow();
  });

  it("no shape means two states anywhere in the app", () => {
    const shapes = Object.values(STATE_LOOKS).flatMap((kind) => Object.values(kind).map((l) => l.shape));
    expect(new Set(shapes).size).toBe(shapes.length);
  });
});

describe("dates through Intl.DateTimeFormat", () => {
  it("shows a calendar date as written and a time with its zone", () => {
    // Source: ECMA-402 DateTimeFormat, en-GB pattern "d MMM y" (common practice for the locale).
    expect(formatDate("2026-12-02")).toBe("2 Dec 2026");
    expect(formatDateTime("2026-12-02T13:05:09Z")).toBe("2 Dec 2026, 13:05 UTC");
    expect(formatDateTime(new Date("2026-07-01T23:30:00Z"), "Europe/Berlin")).toMatch(/^2 Jul 2026, 01:30 (CEST|GMT\+2)$/);
  });
});

describe("lab navigation", () => {
  it("offers each role its places", () => {
    expect(labNavItems(LAB, "tester").map((i) => i.label)).toEqual(["Home", "My runs", "Protocols"]);
    expect(labNavItems(LAB, "analyst").map((i) => i.label)).toEqual(["Home", "Results", "Quality", "Protocols"]);
    expect(labNavItems(LAB, "lead").map((i) => i.label)).toEqual(["Home", "Studies", "Protocols", "Library", "Results", "Quality", "Members"]);
  });

  it("marks the place a path belongs to", () => {
    const lead = labNavItems(LAB, "lead");
    expect(currentPlace(lead, LAB, `/labs/${LAB}`)).toBe("home");
    expect(currentPlace(lead, LAB, `/labs/${LAB}/studies/${STUDY}/design/arms`)).toBe("studies");
    expect(currentPlace(lead, LAB, `/labs/${LAB}/studies/${STUDY}/results`)).toBe("results");
    expect(currentPlace(lead, LAB, `/labs/${LAB}/instruments/${STUDY}`)).toBe("library");
    expect(currentPlace(lead, LAB, `/labs/${LAB}/audit`)).toBe("members");
    expect(currentPlace(labNavItems(LAB, "tester"), LAB, "/bench")).toBe("bench");
    expect(currentPlace(labNavItems(LAB, "tester"), LAB, `/labs/${LAB}/bench/runs/${STUDY}`)).toBe("bench");
    expect(currentPlace(lead, LAB, "/account")).toBeNull();
  });

  it("builds breadcrumbs from the page's own data, with links only to pages the role can open", () => {
    const lab = { id: LAB, name: "Lab X", role: "lead" };
    const data = { study: { id: STUDY, shortName: "T-9" } };
    expect(breadcrumbs(`/labs/${LAB}/studies`, lab, data)).toEqual([]);
    expect(breadcrumbs(`/labs/${LAB}/studies/${STUDY}/design/arms`, lab, data)).toEqual([
      { label: "Lab X", to: `/labs/${LAB}` },
      { label: "Studies", to: `/labs/${LAB}/studies` },
      { label: "T-9", to: `/labs/${LAB}/studies/${STUDY}` },
      { label: "Design", to: null },
      { label: "Arms", to: null },
    ]);
    const analyst = breadcrumbs(`/labs/${LAB}/studies/${STUDY}/results`, { ...lab, role: "analyst" }, data);
    expect(analyst.map((c) => c.to)).toEqual([`/labs/${LAB}`, null, null, null]);
    // An id with no name in the page's data is not looked up elsewhere.
    expect(breadcrumbs(`/labs/${LAB}/bench/runs/${STUDY}`, { ...lab, role: "tester" }, {}).map((c) => c.label)).toEqual(["Lab X", "Bench", "Run"]);
  });
});
