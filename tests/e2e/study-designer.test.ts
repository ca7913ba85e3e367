import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Locator, Page } from "playwright-core";
import { keyboardDrag } from "../support/enrolment-drag.ts";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const ARM_1 = "Tempered low (e2e)";
const ARM_2 = "Tempered high (e2e)";

const box = (page: Page, title: string) => page.locator("section[data-box]").filter({ has: page.getByRole("heading", { name: new RegExp(`^Arm: ${title.replace(/[()]/g, "\\$&")}`) }) });

describe("study designer", () => {
  it("a lead designs a parallel study, enrols blades by keyboard drag and drop and by the table, randomizes with a typed seed and opens the label sheet", async () => {
    const baseUrl = inject("baseUrl");
    await browser.clearCookies();
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("lead@demo.test");
    await page.getByLabel("Password").fill("blindcut-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);

    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Studies" }).click();
    await page.waitForURL(/\/studies$/);
    await page.getByRole("link", { name: "New study" }).click();
    await page.waitForURL(/\/studies\/new$/);
    const shortName = `Temper e2e ${Date.now().toString(36)}`;
    await page.getByLabel("Short name").fill(shortName);
    await page.getByLabel(/Parallel arms/).check();
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/design\/question$/);

    // The form says what testers see.
    await page.getByText("The short name and the question are shown to testers").waitFor();
    await page.getByLabel(/^Question/).fill("Does the lower temper keep an edge longer on rope?");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/design\/protocol$/);

    const protocol = page.getByLabel("Protocol version");
    await protocol.waitFor();
    const demoOption = await protocol.locator("option", { hasText: "Hand rope test (demo)" }).first().getAttribute("value");
    await protocol.selectOption(demoOption!);
    await page.getByRole("link", { name: "Plan the sample size" }).waitFor();
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/design\/outcomes$/);
    await page.getByLabel(/Cuts to threshold/).first().waitFor();
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/design\/arms$/);

    for (const [i, name] of [ARM_1, ARM_2].entries()) {
      const form = page.getByRole("form", { name: "New arm" });
      await form.getByLabel("Arm name").fill(name);
      await form.getByRole("button", { name: "Add the arm" }).click();
      await page.getByRole("form", { name: `Arm ${i + 1}: ${name}` }).waitFor();
    }
    await page.getByRole("link", { name: "Continue →" }).click();
    await page.waitForURL(/\/design\/blades$/);
    await box(page, ARM_1).waitFor();

    // The first three blades that can be enrolled (retired or checked-out ones are disabled).
    const handles = page.locator('[data-box="library"] button[aria-label^="Drag blade"]:not([disabled])');
    await expect.poll(() => handles.count()).toBeGreaterThanOrEqual(4);
    const names = await handles.evaluateAll((els) => els.slice(0, 4).map((e) => e.getAttribute("aria-label")!.replace("Drag blade ", "")));

    const tableSelect = (inv: string) => page.getByLabel(`Arm for blade ${inv}`);
    await keyboardDrag(page, page.getByRole("button", { name: `Drag blade ${names[0]}` }), 1);
    await box(page, ARM_1).locator(`[data-blade="${names[0]}"]`).waitFor();
    // Saved on the server: the table, re-read after the save, shows the blade in its arm.
    await expect.poll(async () => (await tableSelect(names[0]).locator("option:checked").textContent())?.trim()).toBe(ARM_1);
    const announced = await page.locator('[id^="DndLiveRegion"]').allTextContents();
    expect(announced.join(" ")).toContain(`dropped into Arm: ${ARM_1}`);

    await keyboardDrag(page, page.getByRole("button", { name: `Drag blade ${names[1]}` }), 2);
    await box(page, ARM_2).locator(`[data-blade="${names[1]}"]`).waitFor();
    await expect.poll(async () => (await tableSelect(names[1]).locator("option:checked").textContent())?.trim()).toBe(ARM_2);

    // The table alternative, without dragging.
    await tableSelect(names[2]).selectOption({ label: ARM_2 });
    await page.getByRole("button", { name: "Save the table" }).click();
    await page.getByRole("status").filter({ hasText: "Enrolment saved." }).waitFor();
    await box(page, ARM_2).locator(`[data-blade="${names[2]}"]`).waitFor();
    // Permuted blocks need as many runs in every arm: a fourth blade, by keyboard again.
    await keyboardDrag(page, page.getByRole("button", { name: `Drag blade ${names[3]}` }), 1);
    await expect.poll(async () => (await tableSelect(names[3]).locator("option:checked").textContent())?.trim()).toBe(ARM_1);
    await expect.poll(() => box(page, ARM_1).locator("[data-blade]").count()).toBe(2);
    await expect.poll(() => box(page, ARM_2).locator("[data-blade]").count()).toBe(2);
    await screenshot(page, "study-designer-enrolment");

    await page.getByRole("link", { name: "Continue →" }).click();
    await page.waitForURL(/\/design\/analysis$/);
    await page.getByLabel("Alpha").waitFor();
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/design\/people$/);

    const testers = page.locator('input[name="testerIds"]:not([disabled])');
    await expect.poll(() => testers.count()).toBeGreaterThanOrEqual(1);
    for (const input of await testers.all()) await input.check();
    // Leads are offered as testers only disabled, with the reason.
    await page.getByText(/owners and leads can open every key, so they cannot test blind/).first().waitFor();
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/design\/randomization$/);
    await page.getByLabel("Block sizes (runs)").waitFor();
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/randomize$/);

    await page.getByText("The design is complete: it can be randomized.").waitFor();
    await page.getByLabel("Seed").fill("e2e typed seed");
    await page.getByRole("button", { name: "Randomize the study" }).click();
    // A refusal would show as an alert: name it rather than time out.
    await page.getByTestId("schedule").or(page.getByRole("alert")).first().waitFor();
    if (await page.getByRole("alert").count()) throw new Error(`randomization refused: ${await page.getByRole("alert").allInnerTexts()} ${await page.getByTestId("design-problems").allInnerTexts()}`);
    await page.waitForURL(/\/randomize\?rolled=1$/);
    expect(await page.getByTestId("seed").textContent()).toBe("e2e typed seed");
    const rows = page.getByTestId("schedule").locator("tbody tr");
    expect(await rows.count()).toBeGreaterThanOrEqual(4);
    // Each row shows a blind code in its grouped form.
    for (const code of await rows.locator("td:nth-child(4)").allTextContents()) expect(code).toMatch(/^[0-9A-Z]{3}-[0-9A-Z]{3}$/);
    await page.getByTestId("balance").waitFor();
    await screenshot(page, "study-designer-schedule");

    await page.getByRole("link", { name: "Label sheet" }).first().click();
    await page.waitForURL(/\/labels$/);
    const labels = page.getByTestId("labels").locator("li");
    await expect.poll(() => labels.count()).toBe(4);
    expect(await labels.locator("svg").count()).toBe(4);
    const sheet = await page.getByTestId("labels").innerText();
    expect(sheet).toContain(shortName);
    for (const secret of [...names, ARM_1, ARM_2, "AISI"]) expect(sheet).not.toContain(secret);
    await screenshot(page, "study-designer-labels");
    expect(errors).toEqual([]);
  });
});
