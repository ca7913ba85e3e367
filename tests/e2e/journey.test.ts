// The three journeys, chained, in a fresh lab and through the UI only (the one look
// behind the screens is reading the caught e-mail): a lead builds and starts a blinded
// study, a tester runs it at the bench, an analyst reads it blind, the lead unblinds,
// the report prints and the bundle re-analyses. Each `it` is one step; they share state.
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Locator, Page } from "playwright-core";
import { execFileSync, spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readFileSync, statSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { keyboardDrag } from "../support/enrolment-drag.ts";
import { launchBrowser, screenshot, screenshotDir, watchConsole } from "../support/browser.ts";
import { firstLink, waitForMail } from "../support/mail.ts";

const ROOT = path.resolve(import.meta.dirname, "../..");
const tag = Date.now().toString(36);
const people = {
  lead: { name: "Journey Lead", email: `journey-lead-${tag}@lab.test`, password: "journey lead passphrase" },
  tester: { name: "Journey Tester", email: `journey-tester-${tag}@lab.test`, password: "journey tester passphrase" },
  analyst: { name: "Journey Analyst", email: `journey-analyst-${tag}@lab.test`, password: "journey analyst passphrase" },
};
const LAB = `Journey lab ${tag}`;
const PROTOCOL = `Journey rope ${tag}`;
const STUDY = `Journey temper ${tag}`;
// The long-lasting arm and the short-lived one: names only the lead's screens show.
const LONG = "Tempered 175 °C (journey)";
const SHORT = "Tempered 230 °C (journey)";
const FORM_BLADES = ["J-01", "J-02", "J-03", "J-04"];
const CSV_BLADES = ["J-05", "J-06"];
// Whether a page gives a secret away. An inventory number counts as a whole word only: a random blind
// code such as "WVJ-01T" may hold "J-01" by chance. Every other secret counts anywhere in the text.
function leaks(text: string, secret: string) {
  if (![...FORM_BLADES, ...CSV_BLADES].includes(secret)) return text.includes(secret);
  return new RegExp(`(?<![A-Za-z0-9])${secret}(?![A-Za-z0-9])`).test(text);
}
const SEED = `journey typed seed ${tag}`;

let lead: { browser: BrowserContext; page: Page; errors: string[] };
let tester: { browser: BrowserContext; page: Page; errors: string[] };
let analyst: { browser: BrowserContext; page: Page; errors: string[] };
let labPath = "";
let studyPath = "";
/** What the lead's screens showed: the schedule (position → code), each code's neutral label, and the key. */
const schedule = new Map<number, string>();
const labelOfCode = new Map<string, string>();
const nameOfLabel = new Map<string, string>();
let labelCodes: string[] = [];
const invitationLinks: Record<"tester" | "analyst", string> = { tester: "", analyst: "" };
const started = Date.now();

async function person() {
  const browser = await launchBrowser();
  const page = await browser.newPage();
  page.setDefaultTimeout(15_000);
  return { browser, page, errors: watchConsole(page) };
}

beforeAll(async () => {
  lead = await person();
  tester = await person();
  analyst = await person();
});
afterAll(async () => {
  await Promise.all([lead?.browser.close(), tester?.browser.close(), analyst?.browser.close()]);
  console.log(`journey took ${((Date.now() - started) / 1000).toFixed(1)} s`);
});

// One chained journey: once a step fails, the steps after it are skipped rather than failing for it.
let brokenAt = "";
afterEach((ctx) => {
  if (ctx.task.result?.state === "fail" && !brokenAt) brokenAt = ctx.task.name;
});
beforeEach((ctx) => {
  if (brokenAt) ctx.skip(`an earlier step failed: ${brokenAt}`);
});

const url = (p: string) => `${inject("baseUrl")}${p}`;
const section = (page: Page, heading: string) => page.locator("section").filter({ has: page.getByRole("heading", { name: heading, exact: true }) });
const box = (page: Page, title: string) => page.locator("section[data-box]").filter({ has: page.getByRole("heading", { name: new RegExp(`^Arm: ${title.replace(/[()]/g, "\\$&")}`) }) });

async function saveAndContinue(page: Page, next: RegExp) {
  await page.getByRole("button", { name: "Save and continue" }).click();
  await page.waitForURL(next);
  await page.getByRole("heading", { level: 1 }).waitFor();
}

/**
 * The reading the tester takes for a blade of one arm at a cut: the short-lived arm
 * dulls fast and crosses 400 gf at cut 4; the long-lasting one crosses at cut 8 or 10.
 * Positions differ a little around the same mean; blades differ in their slope.
 */
function readingFor(arm: "long" | "short", k: number, cut: number, position: string) {
  const slope = arm === "short" ? 65 + 5 * k : 28 + 4 * k;
  const mean = (arm === "short" ? 160 : 150) + slope * cut;
  const offset = position === "heel" ? 5 : position === "tip" ? -5 : position === "fresh spot" ? 5 : 0;
  return String(mean + offset);
}

describe("three journeys: lead, tester, analyst", () => {
  it("the lead signs up, creating a lab, and invites a tester and an analyst by e-mail", async () => {
    const { page } = lead;
    await page.goto(url("/"));
    await page.getByRole("link", { name: "Create a lab" }).first().click();
    await page.waitForURL(/\/sign-up$/);
    await page.getByLabel("Your name").fill(people.lead.name);
    await page.getByLabel("E-mail").fill(people.lead.email);
    await page.getByLabel("Password").fill(people.lead.password);
    await page.getByLabel("Lab name").fill(LAB);
    await page.getByRole("button", { name: "Create the lab" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    await page.getByText("Your role: Owner").waitFor();
    labPath = new URL(page.url()).pathname;
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toContain(LAB);
    await screenshot(page, "journey-lead-lab-home");

    await page.getByRole("link", { name: /Invitations/ }).click();
    await page.waitForURL(/\/invitations$/);
    for (const who of ["tester", "analyst"] as const) {
      await page.getByLabel("E-mail").fill(people[who].email);
      await page.getByLabel("Role").selectOption(who);
      await page.getByRole("button", { name: "Send the invitation" }).click();
      await page.getByRole("status").filter({ hasText: `Invitation sent to ${people[who].email}` }).waitFor();
      const mail = await waitForMail(inject("mailDir"), people[who].email, /invited/);
      invitationLinks[who] = firstLink(mail);
    }
    await expect.poll(() => page.locator('td[data-state="pending"]').count()).toBe(2);
    await screenshot(page, "journey-lead-invitations");
  });

  it("the tester and the analyst accept their invitations and set their passwords", async () => {
    for (const [who, role] of [["tester", "Tester"], ["analyst", "Analyst"]] as const) {
      const { page } = who === "tester" ? tester : analyst;
      await page.goto(invitationLinks[who]);
      await page.getByLabel("Your name").fill(people[who].name);
      await page.getByLabel("Choose a password").fill(people[who].password);
      await page.getByRole("button", { name: "Create my account and join" }).click();
      await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
      await page.getByText(`Your role: ${role}`).waitFor();
      expect(new URL(page.url()).pathname).toBe(labPath);
      await screenshot(page, `journey-${who}-lab-home`);
    }
    await lead.page.goto(url(`${labPath}/members`));
    const members = lead.page.locator("main");
    await expect.poll(() => members.innerText()).toContain(people.tester.name);
    expect(await members.innerText()).toContain(people.analyst.name);
    await screenshot(lead.page, "journey-lead-members");
  });

  it("the lead adds six blades (four by the form, two by CSV import), a rope medium with a lot, and a sharpness tester", async () => {
    const { page } = lead;
    await page.goto(url(labPath));
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Library" }).click();
    await page.waitForURL(/\/blades$/);
    await page.getByRole("link", { name: "Add a blade" }).first().waitFor();
    for (const [i, inv] of FORM_BLADES.entries()) {
      await page.getByRole("link", { name: "Add a blade" }).first().click();
      await page.waitForURL(/\/blades\/new$/);
      await page.getByLabel("Inventory number").fill(inv);
      await page.getByLabel("Steel designation").fill("AISI 52100");
      await page.getByLabel("Hardness readings").fill(i < 2 ? "61.8 62.1 62.0" : "59.4 59.6 59.5");
      await page.getByLabel("Heat-treatment notes").fill(i < 2 ? "2 × 2 h at 175 °C" : "2 × 2 h at 230 °C");
      await page.getByLabel("Edge angle per side").fill("17");
      await page.getByRole("button", { name: "Add the blade" }).click();
      await page.waitForURL(/\/blades\/[0-9a-f-]{36}$/);
      await page.getByRole("heading", { level: 1, name: new RegExp(inv) }).waitFor();
      if (i === 0) await screenshot(page, "journey-lead-blade");
      await page.getByRole("link", { name: "Blades", exact: true }).click();
      await page.waitForURL(/\/blades$/);
    }

    // Two more from a CSV file, uploaded through the import page.
    const dir = mkdtempSync(path.join(os.tmpdir(), "blindcut-journey-"));
    const csv = path.join(dir, "blades.csv");
    writeFileSync(csv, ["inventory_number,steel,hardness_hrc,heat_treatment,edge_angle_deg", `${CSV_BLADES[0]},AISI 52100,62.0 61.9,2 × 2 h at 175 °C,17`, `${CSV_BLADES[1]},AISI 52100,59.7 59.5,2 × 2 h at 230 °C,17`, ""].join("\n"));
    await page.goto(url(`${labPath}/blades/import`));
    await page.getByLabel("CSV file").setInputFiles(csv);
    await page.getByRole("button", { name: "Preview" }).click();
    await page.getByRole("heading", { name: "Preview: 2 valid rows, 0 errors" }).waitFor();
    await screenshot(page, "journey-lead-import-preview");
    await page.getByRole("button", { name: "Import 2 blades" }).click();
    await page.waitForURL(/\/blades\?imported=2$/);
    const rows = page.getByTestId("blades-table").locator("tbody tr");
    await expect.poll(() => rows.count()).toBe(6);
    const table = await page.getByTestId("blades-table").innerText();
    for (const inv of [...FORM_BLADES, ...CSV_BLADES]) expect(table).toContain(inv);
    await screenshot(page, "journey-lead-blades");

    await page.getByRole("link", { name: "Cut media" }).click();
    await page.waitForURL(/\/media$/);
    const addMedium = section(page, "Add a medium");
    await addMedium.getByLabel("Name").fill("Manila rope 12 mm (journey)");
    await addMedium.getByLabel("Kind").selectOption("rope");
    await addMedium.getByLabel("Material").fill("manila");
    await addMedium.getByLabel(/Diameter/).fill("12");
    await addMedium.getByRole("button", { name: "Add the medium" }).click();
    await page.getByRole("link", { name: "Manila rope 12 mm (journey)" }).click();
    await page.waitForURL(/\/media\/[0-9a-f-]{36}$/);
    await page.getByLabel("Lot code").fill("JR-LOT-1");
    await page.getByLabel("Conditioning").fill("48 h at 50 % relative humidity");
    await page.getByRole("button", { name: "Record the lot" }).click();
    await page.getByRole("cell", { name: "JR-LOT-1" }).waitFor();
    await screenshot(page, "journey-lead-medium");

    await page.getByRole("link", { name: "Instruments" }).click();
    await page.waitForURL(/\/instruments$/);
    const addInstrument = section(page, "Add an instrument");
    await addInstrument.getByLabel("Name").fill("Bench tester 1 (journey)");
    await addInstrument.getByLabel("Kind").selectOption("sharpness_tester");
    await addInstrument.getByLabel("Test medium").fill("Monofilament test line (invented)");
    await addInstrument.getByLabel("Resolution").fill("1");
    await addInstrument.getByLabel("Maximum reading").fill("2000");
    await addInstrument.getByRole("button", { name: "Add the instrument" }).click();
    await page.getByTestId("instruments-table").getByRole("link", { name: "Bench tester 1 (journey)" }).waitFor();
  });

  it("the lead publishes a short rope protocol: from the rope template, checks every 2 cuts, cap 10", async () => {
    const { page } = lead;
    await page.goto(url(labPath));
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Protocols" }).click();
    await page.waitForURL(/\/protocols$/);
    await page.getByRole("link", { name: "New protocol" }).click();
    await page.waitForURL(/\/protocols\/new$/);
    await page.getByLabel("Name").fill(PROTOCOL);
    await page.getByLabel(/Hand rope test with an edge-force tester/).check();
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/protocols\/[0-9a-f-]{36}\/versions\/1$/);
    await page.getByRole("button", { name: "Save draft" }).waitFor();
    await page.getByLabel("Lab medium").selectOption({ label: "Manila rope 12 mm (journey)" });
    await page.getByLabel(/^Replicates per blade/).fill("1");
    await page.getByLabel(/^Check after every/).fill("2");
    await page.getByLabel(/^Cap on cuts/).fill("10");
    await screenshot(page, "journey-lead-protocol-editor");
    await page.getByRole("button", { name: "Save and publish" }).click();
    await page.getByTestId("content-hash").waitFor();
    expect(await page.getByTestId("content-hash").textContent()).toMatch(/^[0-9a-f]{64}$/);
    const record = await page.locator("main").innerText();
    expect(record).toContain("Manila rope 12 mm (journey)");
    await screenshot(page, "journey-lead-protocol-published");
  });

  it("the lead designs a parallel study with two arms and enrols the six blades by keyboard drag and drop", async () => {
    const { page } = lead;
    await page.goto(url(labPath));
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Studies" }).click();
    await page.waitForURL(/\/studies$/);
    await page.getByRole("link", { name: "New study" }).click();
    await page.waitForURL(/\/studies\/new$/);
    await page.getByLabel("Short name").fill(STUDY);
    await page.getByLabel(/Parallel arms/).check();
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/design\/question$/);
    studyPath = new URL(page.url()).pathname.replace(/\/design\/question$/, "");
    await page.getByLabel(/^Question/).fill("Does the lower temper keep an edge longer on rope?");
    await page.getByLabel(/^Hypothesis/).fill("Blades tempered at 175 °C reach the threshold later.");
    await saveAndContinue(page, /\/design\/protocol$/);

    const protocol = page.getByLabel("Protocol version");
    const option = await protocol.locator("option", { hasText: PROTOCOL }).first().getAttribute("value");
    await protocol.selectOption(option!);
    await saveAndContinue(page, /\/design\/outcomes$/);
    await page.getByLabel(/Cuts to threshold/).first().waitFor();
    await saveAndContinue(page, /\/design\/arms$/);

    for (const [i, name] of [LONG, SHORT].entries()) {
      const form = page.getByRole("form", { name: "New arm" });
      await form.getByLabel("Arm name").fill(name);
      await form.getByRole("button", { name: "Add the arm" }).click();
      await page.getByRole("form", { name: `Arm ${i + 1}: ${name}` }).waitFor();
    }
    await screenshot(page, "journey-lead-arms");
    await page.getByRole("link", { name: "Continue →" }).click();
    await page.waitForURL(/\/design\/blades$/);
    await box(page, LONG).waitFor();

    // J-01, J-02 and J-05 were tempered low: the first arm (one box to the right); the rest the second (two).
    const target: Record<string, [string, number]> = { "J-01": [LONG, 1], "J-02": [LONG, 1], "J-05": [LONG, 1], "J-03": [SHORT, 2], "J-04": [SHORT, 2], "J-06": [SHORT, 2] };
    for (const [inv, [arm, steps]] of Object.entries(target)) {
      await keyboardDrag(page, page.getByRole("button", { name: `Drag blade ${inv}` }), steps);
      await box(page, arm).locator(`[data-blade="${inv}"]`).waitFor();
      // Saved on the server: the table, re-read after the save, shows the blade in its arm.
      await expect.poll(async () => (await page.getByLabel(`Arm for blade ${inv}`).locator("option:checked").textContent())?.trim()).toBe(arm);
    }
    await expect.poll(() => box(page, LONG).locator("[data-blade]").count()).toBe(3);
    await expect.poll(() => box(page, SHORT).locator("[data-blade]").count()).toBe(3);
    const announced = await page.locator('[id^="DndLiveRegion"]').allTextContents();
    expect(announced.join(" ")).toContain(`dropped into Arm: ${SHORT}`);
    await screenshot(page, "journey-lead-enrolment");
  });

  it("the lead picks the tester, randomizes with a typed seed, opens the label sheet and starts the study", async () => {
    const { page } = lead;
    await page.getByRole("link", { name: "Continue →" }).click();
    await page.waitForURL(/\/design\/analysis$/);
    await page.getByLabel("Alpha").waitFor();
    await saveAndContinue(page, /\/design\/people$/);
    const testers = page.locator('input[name="testerIds"]:not([disabled])');
    await expect.poll(() => testers.count()).toBe(1);
    await page.getByLabel(new RegExp(people.tester.name)).check();
    await saveAndContinue(page, /\/design\/randomization$/);
    await page.getByLabel("Block sizes (runs)").fill("2");
    await expect(page.getByLabel("Replicates per blade").inputValue()).resolves.toBe("1");
    await saveAndContinue(page, /\/randomize$/);

    await page.getByText("The design is complete: it can be randomized.").waitFor();
    await page.getByLabel("Seed").fill(SEED);
    await page.getByRole("button", { name: "Randomize the study" }).click();
    await page.getByTestId("schedule").or(page.getByRole("alert")).first().waitFor();
    if (await page.getByRole("alert").count()) throw new Error(`randomization refused: ${await page.getByRole("alert").allInnerTexts()}`);
    await page.waitForURL(/\/randomize\?rolled=1$/);
    expect(await page.getByTestId("seed").textContent()).toBe(SEED);

    // What the lead sees and carries: run order with codes and neutral labels, and the key.
    const rows = await page.getByTestId("schedule").locator("tbody tr").evaluateAll((trs) => trs.map((tr) => [...tr.querySelectorAll("td")].map((td) => td.textContent!.trim())));
    expect(rows).toHaveLength(6);
    for (const [position, , testerName, code, , label] of rows) {
      expect(testerName).toBe(people.tester.name);
      expect(code).toMatch(/^[0-9A-Z]{3}-[0-9A-Z]{3}$/);
      schedule.set(Number(position), code);
      labelOfCode.set(code, label);
    }
    const key = (await page.getByText(/^Key \(for you only\):/).textContent())!.replace(/^Key \(for you only\):\s*/, "").replace(/\.$/, "");
    for (const pair of key.split("; ")) {
      const [label, name] = pair.split(" = ");
      nameOfLabel.set(label.trim(), name.trim());
    }
    expect([...nameOfLabel.values()].sort()).toEqual([LONG, SHORT].sort());
    expect(new Set(labelOfCode.values()).size).toBe(2);
    await screenshot(page, "journey-lead-schedule");

    await page.getByRole("link", { name: "Label sheet" }).first().click();
    await page.waitForURL(/\/labels$/);
    const labels = page.getByTestId("labels").locator("li");
    await expect.poll(() => labels.count()).toBe(6);
    expect(await labels.locator("svg").count()).toBe(6);
    labelCodes = await labels.evaluateAll((lis) => lis.map((li) => li.getAttribute("data-code")!));
    expect([...labelCodes].sort()).toEqual([...schedule.values()].sort());
    const sheet = await page.getByTestId("labels").innerText();
    for (const secret of [...FORM_BLADES, ...CSV_BLADES, LONG, SHORT, "AISI"]) expect(leaks(sheet, secret), secret).toBe(false);
    await screenshot(page, "journey-lead-labels");

    await page.goto(url(`${studyPath}/start`));
    await page.getByText(`${people.tester.name}: 6 runs`).waitFor();
    await page.getByRole("button", { name: "Start the study and tell the testers" }).click();
    await page.waitForURL(/\?started=1/);
    await page.getByRole("heading", { level: 1 }).waitFor();
    await screenshot(page, "journey-lead-study-started");
    const mail = await waitForMail(inject("mailDir"), people.tester.email, /run/i);
    expect(mail.text).toContain(STUDY);
    for (const code of labelCodes) expect(mail.text).not.toContain(code);
  });

  it("the tester runs every assigned run to its end, one arm outlasting the other, and corrects one reading with a reason", async () => {
    const { page } = tester;
    await page.goto(url(labPath));
    await page.getByRole("link", { name: "My runs" }).first().click();
    await page.waitForURL(/\/bench$/);
    const queue = page.getByTestId("queue-study").filter({ hasText: STUDY });
    await queue.waitFor();
    await expect.poll(() => queue.getByTestId("queue-run").count()).toBe(6);
    const queueText = await queue.innerText();
    for (const secret of [...FORM_BLADES, ...CSV_BLADES, LONG, SHORT, "Arm A", "Arm B", "AISI"]) expect(leaks(queueText, secret), secret).toBe(false);
    await screenshot(page, "journey-tester-queue");

    const blades = { long: 0, short: 0 };
    let corrected = false;
    for (let n = 0; n < 6; n++) {
      await page.goto(url("/bench"));
      await queue.locator('[data-testid="queue-run"][data-next="yes"]').click();
      await page.waitForURL(/\/bench\/runs\/[0-9a-f-]{36}$/);
      await page.getByTestId("run-code").waitFor();
      // The tester picks up the blade labelled for this schedule position, from the lead's sheet.
      const position = Number((await page.locator("main header p").first().innerText()).match(/schedule #(\d+)/)![1]);
      const code = schedule.get(position)!;
      expect(labelCodes).toContain(code);
      const pageText = await page.locator("main").innerText();
      for (const secret of [...FORM_BLADES, ...CSV_BLADES, LONG, SHORT, "AISI", "HRC"]) expect(leaks(pageText, secret), secret).toBe(false);
      const arm = nameOfLabel.get(labelOfCode.get(code)!) === LONG ? "long" : "short";
      const k = blades[arm]++;

      await page.getByLabel("1. Blind code on the blade's label").fill(code.toLowerCase().replace("-", ""));
      await page.getByTestId("code-ok").waitFor();
      for (const tick of await page.locator('input[type="checkbox"]').all()) await tick.check();
      await page.getByLabel("Media lot").selectOption({ label: "Manila rope 12 mm (journey) · lot JR-LOT-1" });
      await page.getByLabel("Instrument").selectOption({ index: 1 });
      await page.getByLabel(/Room temperature/).fill("21");
      await page.getByLabel(/Relative humidity/).fill("45");
      if (n === 0) await screenshot(page, "journey-tester-setup");
      await page.getByRole("button", { name: "Start the run" }).click();
      const label = page.getByTestId("entry-label");
      await label.waitFor();

      for (let step = 0; step < 40; step++) {
        if (!(await page.locator("#reading-value").count())) break;
        const text = (await label.textContent())!;
        const confirmation = text.match(/^Confirmation at a fresh spot · cut (\d+)/);
        const check = text.match(/^(?:Baseline|Cut (\d+)) · (\w+)/);
        const cut = confirmation ? Number(confirmation[1]) : Number(check![1] ?? 0);
        const where = confirmation ? "fresh spot" : check![2];
        // The first reading of the study goes in mistyped (a dropped digit) and is corrected below.
        const value = !corrected && n === 0 && step === 0 ? "15" : readingFor(arm, k, cut, where);
        await page.locator("#reading-value").fill(value);
        await page.locator("#reading-value").press("Enter");
        await expect.poll(async () => ((await label.count()) ? await label.textContent() : "(done)"), { timeout: 10_000 }).not.toBe(text);
        if (!corrected && n === 0 && step === 0) {
          const line = page.locator('[data-testid="reading-line"][data-cut="0"][data-position="heel"]');
          await expect.poll(() => line.getAttribute("data-status")).toBe("saved");
          await line.getByRole("button", { name: "Correct" }).click();
          await line.getByLabel(/Corrected value/).fill(readingFor(arm, k, 0, "heel"));
          await line.getByLabel("Reason").fill("Dropped a digit: typed 15 for the reading on the tester");
          await line.getByRole("button", { name: "Save the correction" }).click();
          await page.getByText("(correction: Dropped a digit: typed 15 for the reading on the tester)").waitFor();
          await expect.poll(() => page.getByTestId("reading-status").filter({ hasText: "Corrected" }).count()).toBe(1);
          await screenshot(page, "journey-tester-correction");
          corrected = true;
        }
      }
      const decision = page.getByTestId("server-decision");
      await expect.poll(() => decision.getAttribute("data-state"), { timeout: 15_000 }).toBe("ended_threshold");
      const end = await decision.textContent();
      const endCut = Number(end!.match(/Ended at threshold at cut (\d+)/)![1]);
      if (arm === "short") expect(endCut).toBe(4);
      else expect(endCut).toBe(k === 0 ? 10 : 8);
      await expect.poll(() => page.locator('[data-testid="reading-line"][data-status="saved"]').count()).toBeGreaterThan(6);
      expect(await page.getByTestId("outbox-count").textContent()).toContain("all saved");
      await page.getByTestId("run-curve").waitFor();
      if (n === 0) await screenshot(page, "journey-tester-run-ended");
    }
    expect(blades).toEqual({ long: 3, short: 3 });
    expect(corrected).toBe(true);
    await page.goto(url("/bench"));
    await page.getByRole("heading", { level: 1, name: "My runs" }).waitFor();
    expect(await page.getByTestId("queue-study").filter({ hasText: STUDY }).locator('[data-next="yes"]').count()).toBe(0);
    await screenshot(page, "journey-tester-queue-done");
    expect(tester.errors).toEqual([]);
  });

  it("the lead follows the progress and closes the study", async () => {
    const { page } = lead;
    await page.goto(url(`${studyPath}/progress`));
    await page.getByRole("heading", { level: 1 }).waitFor();
    await screenshot(page, "journey-lead-progress");
    // The study page links neither to its progress nor to its results while it runs: the lead types the address.
    await page.goto(url(`${studyPath}/results`));
    await page.getByText(/6 of 6 runs have ended or been withdrawn/).waitFor();
    await page.getByRole("button", { name: "Close the study" }).click();
    await page.getByText("Blinded.").waitFor();
    expect(await page.getByTestId("study-state").textContent()).toContain("Closed, blinded");
    await screenshot(page, "journey-lead-closed");
  });

  it("the analyst sees blinded results with charts drawn; no arm's name is on the page", async () => {
    const { page } = analyst;
    await waitForMail(inject("mailDir"), people.analyst.email, /closed/i);
    await page.goto(url(labPath));
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/results$/);
    await page.getByRole("link", { name: new RegExp(STUDY) }).click();
    await page.waitForURL(/\/results$/);
    await page.getByText("Blinded.").waitFor();
    const labels = await page.getByTestId("arm-label").allTextContents();
    expect(labels.join(" ")).toMatch(/Arm A.*Arm B/);
    const html = await page.content();
    for (const secret of [LONG, SHORT, ...FORM_BLADES, ...CSV_BLADES]) expect(leaks(html, secret), secret).toBe(false);
    const charts = page.locator("[data-chart-state]");
    await expect.poll(() => charts.count()).toBeGreaterThan(0);
    await expect.poll(() => charts.evaluateAll((els) => els.every((e) => e.getAttribute("data-chart-state") === "ready")), { timeout: 30_000 }).toBe(true);
    await expect.poll(() => page.getByTestId("chart-curves").locator("svg").count()).toBeGreaterThan(0);
    await screenshot(page, "journey-analyst-blinded");
  });

  it("the lead unblinds on the record, and the analyst sees the arms' names: the low temper outlasted the high", async () => {
    const resultsUrl = analyst.page.url();
    await lead.page.goto(resultsUrl);
    await lead.page.getByRole("link", { name: "Unblind…" }).click();
    await lead.page.getByText("Unblinding cannot be undone.").waitFor();
    await screenshot(lead.page, "journey-lead-unblind");
    await lead.page.getByLabel("I understand: unblind this study now.").check();
    await lead.page.getByRole("button", { name: "Unblind the study" }).click();
    await lead.page.getByTestId("unblinded-note").waitFor();

    const { page } = analyst;
    await page.goto(resultsUrl);
    await page.getByTestId("unblinded-note").waitFor();
    const rows = await page.getByTestId("arm-table").locator("tbody tr").evaluateAll((trs) => trs.map((tr) => ({ label: tr.querySelector("th")!.textContent!, mean: Number(tr.querySelectorAll("td")[2].textContent!.replace(/[^\d.]/g, "")) })));
    const long = rows.find((r) => r.label.includes(LONG))!;
    const short = rows.find((r) => r.label.includes(SHORT))!;
    expect(long, "the low temper's row names it").toBeTruthy();
    expect(short, "the high temper's row names it").toBeTruthy();
    // Interpolated cuts to threshold: about 3.4 for the high temper, about 7.9 for the low.
    expect(short.mean).toBeGreaterThan(3);
    expect(short.mean).toBeLessThan(4);
    expect(long.mean).toBeGreaterThan(7);
    expect(long.mean).toBeLessThan(9);
    await expect.poll(() => page.getByTestId("chart-curves").getAttribute("data-chart-state"), { timeout: 30_000 }).toBe("ready");
    await screenshot(page, "journey-analyst-unblinded");
  });

  it("the report prints to PDF with a non-blank first page, and the bundle exports and re-analyses", async () => {
    const { page } = analyst;
    const resultsUrl = page.url();
    await page.getByRole("link", { name: "Study report (print)" }).click();
    await page.waitForURL(/\/report$/);
    await page.getByRole("heading", { level: 1, name: STUDY }).waitFor();
    expect(await page.locator("main").innerText()).toContain(LONG);
    await screenshot(page, "journey-analyst-report");
    mkdirSync(screenshotDir, { recursive: true });
    const pdf = path.join(screenshotDir, "journey-report.pdf");
    await page.pdf({ path: pdf, format: "A4", printBackground: true });
    expect(readFileSync(pdf).subarray(0, 5).toString()).toBe("%PDF-");
    const png = path.join(screenshotDir, "journey-report-page1");
    execFileSync("pdftoppm", ["-png", "-r", "50", "-f", "1", "-l", "1", "-singlefile", pdf, png]);
    expect(statSync(`${png}.png`).size).toBeGreaterThan(5_000);

    await page.goto(resultsUrl);
    const link = page.getByRole("link", { name: "Reproducibility bundle (JSON)" });
    await link.waitFor();
    // The link answers with an attachment: the browser downloads it.
    const [download] = await Promise.all([page.waitForEvent("download"), link.click()]);
    expect(download.suggestedFilename()).toMatch(/^study-[0-9a-f]{8}-bundle\.json$/);
    const text = readFileSync((await download.path())!, "utf8");
    const bundle = JSON.parse(text) as { raw: { study: { shortName: string }; readings: unknown[]; runs: unknown[] } };
    expect(bundle.raw.study.shortName).toBe(STUDY);
    expect(bundle.raw.runs).toHaveLength(6);
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "blindcut-bundle-")), "bundle.json");
    writeFileSync(file, text);
    const run = spawnSync(process.execPath, [path.join(ROOT, "node_modules/tsx/dist/cli.mjs"), "scripts/reanalyze.ts", file], { cwd: ROOT, encoding: "utf8" });
    expect(run.stdout + run.stderr).toContain(`OK: every figure of "${STUDY}" matches`);
    expect(run.status).toBe(0);
    expect(analyst.errors).toEqual([]);
    expect(lead.errors).toEqual([]);
  });
});
