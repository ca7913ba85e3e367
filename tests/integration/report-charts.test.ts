// The printed report carries its charts as server-rendered SVG (no client JavaScript),
// drawn from the same numbers as the results page's analysis JSON.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { studies } from "~/server/db/schema/index.ts";
import { loadDemoData } from "~/server/demo/load.server.ts";

let labId: string;
beforeAll(async () => {
  labId = (await loadDemoData()).labId;
}, 60_000);
afterAll(closeDb);

async function signedIn(email: string) {
  const client = new AppClient();
  expect((await client.post("/sign-in", { email, password: "blindcut-demo" })).status).toBe(302);
  return client;
}

describe("report charts", () => {
  it("the report's HTML holds an SVG for every chart the results page draws, with the same arms", async () => {
    const [t1] = await db().select().from(studies).where(eq(studies.shortName, "Temper trial T-1 (demo)"));
    const analyst = await signedIn("analyst@demo.test");
    const html = await (await analyst.get(`/labs/${labId}/studies/${t1.id}/report`)).text();
    const json = await (await analyst.get(`/labs/${labId}/api/studies/${t1.id}/analysis.json`)).json();
    const section = html.slice(html.indexOf('data-testid="report-charts"'));
    expect(section.length).toBeGreaterThan(100);
    for (const id of ["curves", "intervals", "survival"]) {
      const at = section.indexOf(`data-testid="report-chart-${id}"`);
      expect(at, id).toBeGreaterThan(-1);
      expect(section.slice(at, at + 4000)).toContain("<svg");
    }
    // Every arm the analysis JSON names appears in the SVG legend or labels.
    const arms = [...new Set((json.armIntervals as { arm: string }[]).map((a) => a.arm))];
    expect(arms.length).toBeGreaterThanOrEqual(2);
    for (const arm of arms) expect(section).toContain(arm.replaceAll("&", "&amp;"));
    // The at-risk counts at cut 0 are the number of runs per arm, as in the JSON.
    const atRisk0 = (json.atRisk as { arm: string; cut: number; n: number }[]).filter((a) => a.cut === 0);
    for (const a of atRisk0) expect(section).toContain(`>${a.n}</text>`);
  });

  it("a blinded study's report charts show neutral labels only", async () => {
    const [f1] = await db().select().from(studies).where(eq(studies.shortName, "Finish trial F-1 (demo)"));
    const analyst = await signedIn("analyst@demo.test");
    const html = await (await analyst.get(`/labs/${labId}/studies/${f1.id}/report`)).text();
    const section = html.slice(html.indexOf('data-testid="report-charts"'));
    expect(section).toContain("<svg");
    expect(section).toMatch(/Condition [AB]/);
  });
});
