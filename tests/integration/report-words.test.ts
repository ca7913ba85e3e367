// The printed report names every outcome, state, method and audit action in words:
// no raw identifier (snake_case ids, dotted audit actions) reaches its visible text.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { studies } from "~/server/db/schema/index.ts";
import { loadDemoData } from "~/server/demo/load.server.ts";
import { PRIMARY_OUTCOMES } from "~/domain/study-analysis.ts";

let labId: string;
beforeAll(async () => {
  labId = (await loadDemoData()).labId;
}, 60_000);
afterAll(closeDb);

/** The text a reader sees: scripts and styles dropped, tags removed, entities kept as written. */
function visibleText(html: string): string {
  return html
    .replace(/<script[\s\S]*?<\/script>/g, " ")
    .replace(/<style[\s\S]*?<\/style>/g, " ")
    .replace(/<[^>]+>/g, " ")
    .replace(/\s+/g, " ");
}

async function reportText(shortName: string) {
  const [study] = await db().select().from(studies).where(eq(studies.shortName, shortName));
  const client = new AppClient();
  expect((await client.post("/sign-in", { email: "analyst@demo.test", password: "blindcut-demo" })).status).toBe(302);
  const res = await client.get(`/labs/${labId}/studies/${study.id}/report`);
  expect(res.status).toBe(200);
  return { study, text: visibleText(await res.text()) };
}

describe("report words", () => {
  for (const name of ["Temper trial T-1 (demo)", "Finish trial F-1 (demo)"]) {
    it(`${name}: the report shows no raw id`, async () => {
      const { study, text } = await reportText(name);
      expect(text).toContain("Audit summary");
      // The study's own outcomes, by their human names.
      for (const key of [study.primaryOutcome, ...study.secondaryOutcomes]) {
        expect(text).not.toContain(key);
        expect(text).toContain((PRIMARY_OUTCOMES as Record<string, { label: string }>)[key].label);
      }
      for (const key of Object.keys(PRIMARY_OUTCOMES)) expect(text).not.toContain(key);
      // No snake_case word and no dotted audit action anywhere in the visible text.
      expect(text.match(/\b[a-z]+(?:_[a-z0-9]+)+\b/g) ?? []).toEqual([]);
      expect(text.match(/\b(?:study|run|reading|blade|protocol|member|lab)\.[a-z_]+\b/g) ?? []).toEqual([]);
      expect(text).toMatch(/Study (started|closed)/);
    });
  }
});
