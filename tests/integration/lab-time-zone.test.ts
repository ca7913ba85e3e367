// The lab's time zone: only an owner sets it, a zone that is not IANA is refused at the
// form with a clear message, and the lab's pages show their times in it with the zone named.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { labs, studies } from "~/server/db/schema/index.ts";
import { loadDemoData } from "~/server/demo/load.server.ts";

let labId: string;
let zoneBefore: string;
beforeAll(async () => {
  labId = (await loadDemoData()).labId;
  [{ timeZone: zoneBefore }] = await db().select({ timeZone: labs.timeZone }).from(labs).where(eq(labs.id, labId));
}, 60_000);
afterAll(async () => {
  await db().update(labs).set({ timeZone: zoneBefore }).where(eq(labs.id, labId));
  await closeDb();
});

async function signedIn(email: string) {
  const client = new AppClient();
  expect((await client.post("/sign-in", { email, password: "blindcut-demo" })).status).toBe(302);
  return client;
}
const zoneOf = async () => (await db().select({ timeZone: labs.timeZone }).from(labs).where(eq(labs.id, labId)))[0].timeZone;

describe("lab time zone", () => {
  it("refuses a zone that is not an IANA zone with a form message, and changes nothing", async () => {
    const owner = await signedIn("owner@demo.test");
    const before = await zoneOf();
    for (const bad of ["Mars/Olympus_Mons", "+01:00", "CET-ish", ""]) {
      const res = await owner.post(`/labs/${labId}/settings`, { timeZone: bad });
      expect(res.status, bad).toBe(400);
      const html = await res.text();
      expect(html).toMatch(bad ? /is not an IANA time zone/ : /Choose the lab(&#x27;|')s time zone/);
    }
    expect(await zoneOf()).toBe(before);
  });

  it("only an owner sets the zone: a lead, tester and analyst are refused", async () => {
    for (const email of ["lead@demo.test", "tester@demo.test", "analyst@demo.test"]) {
      const client = await signedIn(email);
      expect((await client.post(`/labs/${labId}/settings`, { timeZone: "Asia/Tokyo" })).status, email).toBe(403);
      expect((await client.get(`/labs/${labId}/settings`)).status, email).toBe(403);
    }
    expect(await zoneOf()).not.toBe("Asia/Tokyo");
  });

  it("an owner sets America/Chicago; the audit log and the report show times in it, zone named", async () => {
    const owner = await signedIn("owner@demo.test");
    const res = await owner.post(`/labs/${labId}/settings`, { timeZone: "America/Chicago" });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("Time zone set to America/Chicago.");
    expect(await zoneOf()).toBe("America/Chicago");
    expect(await (await owner.get(`/labs/${labId}/settings`)).text()).toMatch(/Current time zone: <strong>America\/Chicago<\/strong>/);
    // Chicago is UTC-6 in winter and UTC-5 in summer; en-GB names it by its offset (GMT-6) or abbreviation.
    const audit = (await (await owner.get(`/labs/${labId}/audit`)).text()).replaceAll("<!-- -->", "");
    expect(audit).toMatch(/\d{1,2} \w{3} \d{4}, \d{2}:\d{2} (C[SD]T|GMT-[56])/);
    expect(audit).not.toMatch(/\d{2}:\d{2} UTC/);
    expect(audit).toContain("When (America/Chicago)");
    const [t1] = await db().select().from(studies).where(eq(studies.shortName, "Temper trial T-1 (demo)"));
    const analyst = await signedIn("analyst@demo.test");
    // React separates adjacent text with empty comments in server HTML.
    const report = (await (await analyst.get(`/labs/${labId}/studies/${t1.id}/report`)).text()).replaceAll("<!-- -->", "");
    expect(report).toMatch(/closed \d{1,2} \w{3} \d{4}, \d{2}:\d{2} (C[SD]T|GMT-[56])/);
  });
});
