// The study designer through the app's real routes: a lead designs, randomizes, prints
// labels, exports the key and starts a study; the server refuses what would break the
// blinding or the design, and testers, analysts and other labs are kept out.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { and, asc, eq, sql } from "drizzle-orm";
import { createStudyFixture, type StudyFixture } from "../support/study-fixture.ts";
import { signUp } from "../support/accounts.ts";
import { waitForMail } from "../support/mail.ts";
import type { AppClient } from "../support/app-client.ts";
import { closeDb, db } from "~/server/db.server.ts";
import { blades, runs, studies, studyArms, studyBlades, studyTesters, users } from "~/server/db/schema/index.ts";
import { formatBlindCode } from "~/domain/blind-codes.ts";

afterAll(closeDb);

/** The text of a page as a person reads it: tags dropped, entities decoded. */
async function text(response: Response) {
  const html = await response.text();
  return html
    .replace(/<script[\s\S]*?<\/script>/g, " ")
    .replace(/<[^>]+>/g, " ")
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, "&")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/\s+/g, " ");
}

const userId = async (email: string) => (await db().select({ id: users.id }).from(users).where(eq(users.email, email)))[0].id;

let f: StudyFixture;
let lead: AppClient;
let base: string;
let studyId: string;
let armIds: string[];
let analystId: string;

beforeAll(async () => {
  f = await createStudyFixture({ state: "draft", testers: 2 });
  lead = f.lead.client;
  analystId = await userId(f.analyst.email);
});

const step = (name: string) => `${base}/design/${name}`;

describe("designing a study through the routes", () => {
  it("creates a draft and saves each step, refusing what a lab person got wrong", async () => {
    const created = await lead.post(`/labs/${f.labId}/studies/new`, { shortName: `Designer study ${f.tag}`, design: "parallel" });
    expect(created.status).toBe(302);
    const m = /\/studies\/([0-9a-f-]{36})\/design\/question$/.exec(created.headers.get("location")!);
    expect(m).not.toBeNull();
    studyId = m![1];
    base = `/labs/${f.labId}/studies/${studyId}`;

    // An empty question is refused beside the field (400, never a 500).
    const empty = await lead.post(step("question"), { shortName: "x", question: "", hypothesis: "" });
    expect(empty.status).toBe(400);
    expect(await text(empty)).toContain("Write the study's question");
    expect((await lead.post(step("question"), { shortName: `Designer study ${f.tag}`, question: "Does the temper change cuts to threshold?", hypothesis: "The lower temper lasts longer." })).headers.get("location")).toBe(step("protocol"));

    expect((await lead.post(step("protocol"), { protocolVersionId: f.protocolVersionId, design: "parallel" })).status).toBe(302);

    // A rope protocol does not measure card cut.
    const card = await lead.post(step("outcomes"), { primaryOutcome: "total_card_cut" });
    expect(card.status).toBe(400);
    expect((await lead.post(step("outcomes"), { primaryOutcome: "cuts_to_threshold", secondaryOutcomes: ["working_sharpness", "loss_rate"] })).status).toBe(302);

    for (let i = 0; i < 2; i++) {
      const added = await lead.post(step("arms"), { intent: "add-arm", name: f.ids.armNames[i], description: f.ids.armDescriptions[i], recipeMode: "protocol" });
      expect(added.status).toBe(200);
    }
    const twice = await lead.post(step("arms"), { intent: "add-arm", name: f.ids.armNames[0].toUpperCase(), recipeMode: "protocol" });
    expect(twice.status).toBe(400);
    armIds = (await db().select().from(studyArms).where(eq(studyArms.studyId, studyId)).orderBy(asc(studyArms.position))).map((a) => a.id);
    expect(armIds).toHaveLength(2);

    expect((await lead.post(step("analysis"), { tests: ["welch_t", "mann_whitney"], alpha: "0.7", comparisons: "all_pairs" })).status).toBe(400);
    expect((await lead.post(step("analysis"), { tests: ["paired_t"], alpha: "0.05", comparisons: "all_pairs" })).status).toBe(400);
    expect((await lead.post(step("analysis"), { tests: ["welch_t", "mann_whitney"], alpha: "0.05", comparisons: "vs_reference", referenceArmId: armIds[0] })).status).toBe(302);
    const [study] = await db().select().from(studies).where(eq(studies.id, studyId));
    expect(study.analysisPlan).toEqual({ tests: ["welch_t", "mann_whitney"], alpha: 0.05, comparisons: "vs_reference", referenceArmId: armIds[0] });
    expect(study.secondaryOutcomes).toEqual(["working_sharpness", "loss_rate"]);
  });

  it("enrols blades by arm, one arm per blade, and refuses retired and checked-out blades with the reason", async () => {
    const [b0, b1, b2, b3] = f.bladeIds;
    expect((await lead.post(step("blades"), { intent: "enrol", bladeId: b0, armId: armIds[0] })).status).toBe(200);
    expect((await lead.post(step("blades"), { intent: "move", bladeId: b1, armId: armIds[0] })).status).toBe(200);
    // The table alternative: one select per blade.
    expect((await lead.post(step("blades"), { intent: "set-enrolment", [`blade.${b2}`]: armIds[1], [`blade.${b3}`]: armIds[1] })).status).toBe(200);

    // A blade in one arm of a study only: enrolling it into a second arm is refused.
    const second = await lead.post(step("blades"), { intent: "enrol", bladeId: b0, armId: armIds[1] });
    expect(second.status).toBe(409);
    expect(await text(second)).toContain("a blade can be in one arm of a study only");
    const rows = await db().select().from(studyBlades).where(and(eq(studyBlades.studyId, studyId), eq(studyBlades.bladeId, b0)));
    expect(rows.map((r) => r.armId)).toEqual([armIds[0]]);

    const [retired, out] = await db()
      .insert(blades)
      .values([
        { labId: f.labId, inventoryNumber: `RET-${f.tag}`, steel: "AISI 1095", status: "retired" },
        { labId: f.labId, inventoryNumber: `OUT-${f.tag}`, steel: "AISI 1095", status: "out" },
      ])
      .returning();
    const r1 = await lead.post(step("blades"), { intent: "enrol", bladeId: retired.id, armId: armIds[0] });
    expect(r1.status).toBe(409);
    expect(await text(r1)).toContain("retired blades cannot be enrolled");
    const r2 = await lead.post(step("blades"), { intent: "move", bladeId: out.id, armId: armIds[0] });
    expect(r2.status).toBe(409);
    expect(await text(r2)).toContain("checked out");
    const r3 = await lead.post(step("blades"), { intent: "set-enrolment", [`blade.${out.id}`]: armIds[1] });
    expect(r3.status).toBe(409);
    expect(await db().select().from(studyBlades).where(eq(studyBlades.studyId, studyId))).toHaveLength(4);

    // The enrolment page shows them, disabled, with the reason.
    const page = await text(await lead.get(step("blades")));
    expect(page).toContain(`RET-${f.tag}`);
    expect(page).toContain("retired blades cannot be enrolled");
  });

  it("takes only testers as testers, and requires a preparer where the arms differ in sharpening", async () => {
    const asLead = await lead.post(step("people"), { testerIds: [f.lead.id] });
    expect(asLead.status).toBe(400);
    // Source: docs/product.md, Roles: "owners and leads can open every key, so they cannot test blind".
    expect(await text(asLead)).toContain("owners and leads can open every key, so they cannot test blind");
    const ownerId = await userId(f.owner.email);
    expect(await text(await lead.post(step("people"), { testerIds: [ownerId] }))).toContain("owners and leads can open every key, so they cannot test blind");
    const asAnalyst = await lead.post(step("people"), { testerIds: [f.testers[0].id, analystId] });
    expect(asAnalyst.status).toBe(400);
    expect(await db().select().from(studyTesters).where(eq(studyTesters.studyId, studyId))).toHaveLength(0);
    // A preparer must be an owner or lead.
    expect((await lead.post(step("people"), { testerIds: f.testers.map((t) => t.id), preparerId: f.testers[0].id })).status).toBe(400);

    // One arm gets its own recipe: sharpening now differs.
    const recipe = await lead.post(step("arms"), {
      intent: "update-arm",
      armId: armIds[1],
      name: f.ids.armNames[1],
      description: f.ids.armDescriptions[1],
      recipeMode: "own",
      "recipe.0.abrasive": "Coarse bench stone",
      "recipe.0.grit": "220",
      "recipe.0.angleDegPerSide": "20",
      "recipe.0.amountKind": "strokes",
      "recipe.0.amount": "40",
      "recipe.0.deburring": "",
    });
    expect(recipe.status).toBe(200);
    const noPreparer = await lead.post(step("people"), { testerIds: f.testers.map((t) => t.id) });
    expect(noPreparer.status).toBe(400);
    expect(await text(noPreparer)).toContain("name a preparer");
    expect((await lead.post(step("people"), { testerIds: f.testers.map((t) => t.id), preparerId: f.lead.id })).status).toBe(302);
    expect(await db().select().from(studyTesters).where(eq(studyTesters.studyId, studyId))).toHaveLength(2);
  });

  it("saves the randomization settings, shows the design complete, and randomizes through the route", async () => {
    const bad = await lead.post(step("randomization"), { method: "permuted_blocks", blockSizes: "3", stratifyByTester: "true", sittingLength: "2", replicates: "1" });
    expect(bad.status).toBe(400);
    expect(await text(bad)).toContain("not a multiple of the number of arms (2)");
    const saved = await lead.post(step("randomization"), { method: "permuted_blocks", blockSizes: "2, 4", stratifyByTester: "true", sittingLength: "2", replicates: "1" });
    expect(saved.headers.get("location")).toBe(`${base}/randomize`);

    const review = await text(await lead.get(`${base}/randomize`));
    expect(review).toContain("The design is complete");

    // A blade checked out after its enrolment stops the roll, with the reason.
    await db().update(blades).set({ status: "out" }).where(eq(blades.id, f.bladeIds[3]));
    const checkedOut = await lead.post(`${base}/randomize`, { seed: "designer seed one" });
    expect(checkedOut.status).toBe(400);
    expect(await text(checkedOut)).toContain(`${f.ids.inventory[3]}: This blade is checked out`);
    await db().update(blades).set({ status: "in_lab" }).where(eq(blades.id, f.bladeIds[3]));

    const rolled = await lead.post(`${base}/randomize`, { seed: "designer seed one" });
    expect(rolled.status).toBe(302);
    const [study] = await db().select().from(studies).where(eq(studies.id, studyId));
    expect(study.state).toBe("randomized");
    expect(study.seed).toBe("designer seed one");
    expect(study.scheduleHash).toMatch(/^[0-9a-f]{64}$/);
    expect(study.designHash).toMatch(/^[0-9a-f]{64}$/);
    expect(await db().select().from(runs).where(eq(runs.studyId, studyId))).toHaveLength(4); // 4 blades × 1 replicate

    // The preview shows every run with its code, and the balance table.
    const preview = await text(await lead.get(`${base}/randomize`));
    const codes = (await db().select({ code: studyBlades.blindCode }).from(studyBlades).where(eq(studyBlades.studyId, studyId))).map((c) => formatBlindCode(c.code!));
    for (const code of codes) expect(preview).toContain(code);
    expect(preview).toContain(study.scheduleHash!.slice(0, 12));
    expect(preview).toContain("Balance: runs per arm × tester × sitting");

    // A draft-only step is now frozen: 409.
    expect((await lead.post(step("question"), { shortName: "Changed", question: "Changed?" })).status).toBe(409);

    // A re-roll before the first reading is allowed and gives a new schedule.
    expect((await lead.post(`${base}/randomize`, { seed: "designer seed two" })).status).toBe(302);
    const [again] = await db().select().from(studies).where(eq(studies.id, studyId));
    expect(again.seed).toBe("designer seed two");
    expect(again.scheduleHash).not.toBe(study.scheduleHash);
  });

  it("prints a label sheet with every code and nothing that identifies a blade or arm, and exports one CSV row per run", async () => {
    const response = await lead.get(`${base}/labels`);
    expect(response.status).toBe(200);
    const html = await response.text();
    const codes = (await db().select({ code: studyBlades.blindCode }).from(studyBlades).where(eq(studyBlades.studyId, studyId))).map((c) => c.code!);
    expect(codes).toHaveLength(4);
    for (const code of codes) expect(html).toContain(formatBlindCode(code));
    expect((html.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(4);
    expect(html).toContain(`Designer study ${f.tag}`);
    const secrets = [...f.ids.inventory, ...f.ids.steels, f.ids.sources, f.ids.heatTreatment, ...f.ids.armNames, ...f.ids.armDescriptions, f.ids.hardness];
    for (const s of secrets) expect(html, s).not.toContain(s);

    const csv = await lead.get(`${base}/schedule.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toContain("text/csv");
    const lines = (await csv.text()).trim().split(/\r\n/);
    expect(lines[0]).toContain("blind_code");
    expect(lines).toHaveLength(1 + 4);
  });

  it("keeps testers and analysts out (403) and other labs' ids out (404)", async () => {
    const pages = [`/labs/${f.labId}/studies`, `/labs/${f.labId}/studies/new`, base, step("question"), step("blades"), `${base}/randomize`, `${base}/start`, `${base}/labels`, `${base}/schedule.csv`];
    for (const client of [f.testers[0].client, f.analyst.client]) {
      for (const page of pages) expect((await client.get(page)).status, page).toBe(403);
      expect((await client.post(step("question"), { shortName: "x", question: "y" })).status).toBe(403);
      expect((await client.post(`${base}/randomize`, { seed: "mine" })).status).toBe(403);
    }
    const other = await signUp("Other Lab Owner");
    // Lab A's study under lab B's id, and lab A's id for a member of lab B only.
    for (const page of [`/labs/${other.labId}/studies/${studyId}`, `/labs/${other.labId}/studies/${studyId}/design/question`, `/labs/${other.labId}/studies/${studyId}/labels`, `/labs/${other.labId}/studies/${studyId}/schedule.csv`, `/labs/${other.labId}/studies/${studyId}/randomize`]) {
      expect((await other.client.get(page)).status, page).toBe(404);
    }
    expect((await other.client.post(`/labs/${other.labId}/studies/${studyId}/design/question`, { shortName: "x", question: "y" })).status).toBe(404);
    expect((await other.client.get(`${base}/labels`)).status).toBe(404);
  });

  it("starts the study and mails each tester their run count, with no blade identity", async () => {
    const started = await lead.post(`${base}/start`, {});
    expect(started.status).toBe(302);
    const counts = await db().select({ testerId: runs.testerId, n: sql<number>`count(*)::int` }).from(runs).where(eq(runs.studyId, studyId)).groupBy(runs.testerId);
    const secrets = [...f.ids.inventory, ...f.ids.steels, f.ids.sources, f.ids.heatTreatment, ...f.ids.armNames, ...f.ids.armDescriptions, f.ids.hardness];
    for (const t of f.testers) {
      const mail = await waitForMail(inject("mailDir"), t.email, /Runs assigned/);
      const n = counts.find((c) => c.testerId === t.id)?.n ?? 0;
      expect(mail.text).toContain(`You have ${n} run${n === 1 ? "" : "s"}`);
      expect(mail.text).toMatch(/https?:\/\/\S+\/bench/);
      for (const s of secrets) {
        expect(mail.text, s).not.toContain(s);
        expect(mail.html, s).not.toContain(s);
      }
      const codes = (await db().select({ code: studyBlades.blindCode }).from(studyBlades).where(eq(studyBlades.studyId, studyId))).map((c) => c.code!);
      for (const code of codes) expect(mail.text).not.toContain(code);
    }
    const [study] = await db().select().from(studies).where(eq(studies.id, studyId));
    expect(study.state).toBe("running");
  });

  it("refuses a re-roll once a reading exists", async () => {
    const [run] = await db().select().from(runs).where(eq(runs.studyId, studyId)).limit(1);
    await db().execute(sql`INSERT INTO readings (lab_id, run_id, attempt, cut, position, value, idempotency_key, content_hash, entered_by)
      VALUES (${f.labId}, ${run.id}, 1, 0, 'heel', 120, 'designer-k1', 'h', ${run.testerId})`);
    const running = await lead.post(`${base}/randomize`, { seed: "too late" });
    expect(running.status).toBe(409);
    // Even were the study put back to randomized, the reading alone forbids the re-roll.
    await db().update(studies).set({ state: "randomized" }).where(eq(studies.id, studyId));
    const refused = await lead.post(`${base}/randomize`, { seed: "too late" });
    expect(refused.status).toBe(409);
    expect(await text(refused)).toContain("Readings have been taken");
    const [study] = await db().select().from(studies).where(eq(studies.id, studyId));
    expect(study.seed).toBe("designer seed two");
  });
});

describe("a lab that cannot run a blinded study", () => {
  it("the designer says so when the lab has one person", async () => {
    const alone = await signUp("Lone Owner");
    const created = await alone.client.post(`/labs/${alone.labId}/studies/new`, { shortName: "Solo", design: "within_blade" });
    expect(created.status).toBe(302);
    const page = await text(await alone.client.get(created.headers.get("location")!.replace("/question", "/people")));
    expect(page).toContain("A lab with one person cannot run a blinded study");
    expect(await text(await alone.client.get(`/labs/${alone.labId}/studies`))).toContain("A lab with one person cannot run a blinded study");
  });
});
