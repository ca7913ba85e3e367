// Keyboard drag and drop on the study designer's enrolment board, as a keyboard user does it.
import { expect } from "vitest";
import type { Locator, Page } from "playwright-core";

export /**
 * Drag and drop by keyboard: focus the handle, Space picks up, ArrowRight moves box by
 * box, Space drops. Each step waits until the board shows the blade over the next box
 * (as a sighted person would), so a busy machine neither drops early nor skips a box.
 */
async function keyboardDrag(page: Page, handle: Locator, steps: number) {
  const boxes = page.locator('[data-board="enrolment"] section[data-box]');
  const over = async (i: number) => ((await boxes.nth(i).getAttribute("class")) ?? "").includes("bg-paper-deep");
  await handle.focus();
  await page.keyboard.press("Space");
  await expect.poll(() => page.locator('[data-board="enrolment"] li[data-dragging="true"]').count()).toBe(1);
  await expect.poll(() => over(0)).toBe(true);
  for (let i = 1; i <= steps; i++) {
    await page.keyboard.press("ArrowRight");
    // A key press can land before the sensor listens; if the board has not moved after a while, press once more.
    const moved = await expect.poll(() => over(i), { timeout: 3_000 }).toBe(true).then(() => true, () => false);
    if (!moved && (await over(i - 1))) await page.keyboard.press("ArrowRight");
    await expect.poll(() => over(i), { timeout: 10_000 }).toBe(true);
  }
  await page.keyboard.press("Space");
  await page.waitForFunction(() => document.querySelectorAll('[data-board="enrolment"] li[data-dragging="true"]').length === 0);
}
