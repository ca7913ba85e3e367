// Signed in as a tester, and as an analyst before unblinding, a crawler follows every
// link and every route reachable in the demo data, and fails on any identity string
// of the blades and arms: inventory numbers, steels, sources, heat-treatment notes,
// arm and condition names and descriptions, and hardness as written with its unit.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, inArray, sql } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { crawl, findLeaks } from "../support/crawler.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { blades, labs, studies, studyArms, studyBlades } from "~/server/db/schema/index.ts";
import { loadDemoData } from "~/server/demo/load.server.ts";
import { summarizeHardness } from "~/domain/hardness.ts";

let labId: string;
beforeAll(async () => {
  labId = (await loadDemoData()).labId;
}, 60_000);
afterAll(closeDb);

async function signedIn(email: string) {
  const client = new AppClient();
  const response = await client.post("/sign-in", { email, password: "blindcut-demo" });
  expect(response.status).toBe(302);
  return client;
}

function bladeSecrets(rows: (typeof blades.$inferSelect)[]) {
  return rows.flatMap((b) => [
    b.inventoryNumber,
    b.steel,
    b.source,
    b.heatTreatment,
    b.edgeFinish,
    ...b.hardnessHrc.map((h) => `${h} HRC`),
    ...(b.hardnessHrc.length ? [`${summarizeHardness(b.hardnessHrc).mean.toFixed(1)} HRC`] : []),
  ]);
}

describe("blinding crawl over the demo lab", () => {
  it("a tester reaches nothing that names a blade's identity or an arm", async () => {
    const lab = (await db().select().from(labs).where(eq(labs.id, labId)))[0];
    const allBlades = await db().select().from(blades).where(eq(blades.labId, lab.id));
    const arms = await db().select().from(studyArms).where(eq(studyArms.labId, lab.id));
    const secrets = [...bladeSecrets(allBlades), ...arms.flatMap((a) => [a.name, a.description])].filter((s) => s.length >= 4);
    const studyIds = (await db().select({ id: studies.id }).from(studies).where(eq(studies.labId, lab.id))).map((s) => s.id);
    const pages = await crawl(await signedIn("tester@demo.test"), ["/bench", "/labs", `/labs/${lab.id}`, "/account"], { extraParams: { labId: [lab.id], studyId: studyIds } });
    const reachedRuns = pages.filter((p) => /\/bench\/runs\/[0-9a-f-]{36}$/.test(p.url) && p.status === 200);
    console.log(`[blinding crawl] tester: ${pages.length} pages and routes crawled, ${reachedRuns.length} run pages, ${secrets.length} identity strings checked`);
    expect(reachedRuns.length).toBeGreaterThan(0);
    // The lab home (its "your runs" section) is among the crawled pages.
    const home = pages.find((p) => p.url.endsWith(`/labs/${lab.id}`) && p.status === 200);
    expect(home?.body).toContain('data-testid="home-my-runs"');
    expect(findLeaks(pages, secrets)).toEqual([]);
  });

  it("an analyst reaches nothing that names the blinded study's blades or conditions before unblinding", async () => {
    const [blinded] = await db().select().from(studies).where(eq(studies.shortName, "Finish trial F-1 (demo)"));
    expect(blinded.state).toBe("closed");
    const arms = await db().select().from(studyArms).where(eq(studyArms.studyId, blinded.id));
    const enrolled = await db().select({ bladeId: studyBlades.bladeId }).from(studyBlades).where(eq(studyBlades.studyId, blinded.id));
    const itsBlades = await db().select().from(blades).where(inArray(blades.id, enrolled.map((e) => e.bladeId)));
    const allBlades = await db().select().from(blades).where(eq(blades.labId, labId));
    // Analysts never see inventory numbers of any blade; the blinded study's conditions and blades in full.
    const secrets = [...allBlades.map((b) => b.inventoryNumber), ...bladeSecrets(itsBlades), ...arms.flatMap((a) => [a.name, a.description])].filter((s) => s.length >= 4);
    const studyIds = (await db().select({ id: studies.id }).from(studies).where(eq(studies.labId, labId))).map((s) => s.id);
    const pages = await crawl(await signedIn("analyst@demo.test"), ["/labs", `/labs/${labId}`, `/labs/${labId}/results`], { extraParams: { labId: [labId], studyId: studyIds } });
    const blindedPages = pages.filter((p) => p.url.includes(blinded.id) && p.status === 200);
    console.log(`[blinding crawl] analyst: ${pages.length} pages and routes crawled, ${blindedPages.length} of the blinded study, ${secrets.length} identity strings checked`);
    expect(blindedPages.length).toBeGreaterThanOrEqual(5);
    expect(findLeaks(pages, secrets)).toEqual([]);
  });

  it("no page or route sends a password hash, a session id or a token to anyone, the owner included", async () => {
    const owner = await signedIn("owner@demo.test");
    const sessionId = owner.cookies.get("blindcut_session")!;
    const pages = await crawl(owner, ["/labs", `/labs/${labId}`, "/account", "/bench"], { maxPages: 300, extraParams: { labId: [labId] } });
    const tokens = (await db().execute(sql`SELECT token_hash FROM invitations UNION SELECT token_hash FROM password_resets UNION SELECT id FROM sessions`)).rows.map((r) => String(r.token_hash ?? r.id));
    const secrets = ["$argon2id$", "passwordHash", "password_hash", "tokenHash", decodeURIComponent(sessionId).split(".")[0], ...tokens];
    console.log(`[secrets crawl] owner: ${pages.length} pages and routes crawled`);
    expect(pages.length).toBeGreaterThan(50);
    expect(findLeaks(pages, secrets)).toEqual([]);
  });
});
