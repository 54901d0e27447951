import { expect, test, type Page } from "@playwright/test";
import { closeAlarm, dismissToasts, raiseAlarm } from "./alarm-fixtures";
import { DEMO_PASSWORD, signIn } from "./helpers";

// The on-call technician's path on a phone: an alarm e-mail's link, sign-in, acknowledge.
test.use({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });

const raised: number[] = [];
test.afterAll(() => {
  for (const id of raised) closeAlarm(id);
});

async function fillSignIn(page: Page, role: string) {
  await page.getByLabel("E-mail").fill(`${role}@airkeep.demo`);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
}

async function noSidewaysScroll(page: Page) {
  const { scroll, width } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, width: window.innerWidth }));
  expect(scroll).toBeLessThanOrEqual(width);
}

test("signed out, the alarm link survives sign-in and acknowledging takes two taps", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "hr-bay", key: "stage4C.high.critical", priority: "critical", signal: "stage4C", value: 181.2, limit: 175 });
  raised.push(alarm.id);
  await page.goto(`/alarms?id=${alarm.id}`);
  await expect(page).toHaveURL(/\/login\?callbackUrl=/);
  await fillSignIn(page, "technician");
  await expect(page).toHaveURL(new RegExp(`/alarms\\?id=${alarm.id}$`));

  const detail = page.getByTestId("alarm-highlight");
  await expect(detail).toContainText("Critical");
  await expect(detail).toContainText(alarm.compressorName);
  await expect(detail.getByTestId("alarm-cautions")).toContainText(/carbon monoxide/i);
  await expect(detail.getByTestId("alarm-mini-trend")).toBeVisible();
  await dismissToasts(page);
  await noSidewaysScroll(page);

  // Tap 1: Acknowledge on the alarm. Tap 2: confirm (the comment is optional).
  await detail.getByRole("button", { name: /^Acknowledge/ }).tap();
  await page.getByTestId("alarm-action-form").getByRole("button", { name: "Acknowledge", exact: true }).tap();
  await expect(detail.getByTestId("alarm-state")).toHaveText("Active, acknowledged");
});

test("a shelve needs a comment; a quick phrase fills the acknowledge comment", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "cr-fill", key: "intakeC.high.warning", priority: "warning", signal: "intakeC", value: 46.1, limit: 45 });
  raised.push(alarm.id);
  await signIn(page, "supervisor");
  await page.goto(`/alarms?id=${alarm.id}`);
  await dismissToasts(page);
  const detail = page.getByTestId("alarm-highlight");
  await detail.getByRole("button", { name: /^Shelve/ }).tap();
  const form = page.getByTestId("alarm-action-form");
  await form.getByRole("button", { name: "Shelve", exact: true }).tap();
  await expect(form.getByText(/at least 3 characters/)).toBeVisible();
  await form.getByRole("button", { name: "Cancel" }).tap();

  await detail.getByRole("button", { name: /^Acknowledge/ }).tap();
  await form.getByRole("button", { name: "On my way" }).tap();
  await expect(form.getByLabel(/Comment/)).toHaveValue("On my way");
  await form.getByRole("button", { name: "Acknowledge", exact: true }).tap();
  await expect(detail).toContainText("On my way");
});

test("below 640 px the alarm list is cards, and the board and a compressor page do not scroll sideways", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "mb-portable", key: "deliveryBar.high.warning", priority: "warning", signal: "deliveryBar", value: 212, limit: 210 });
  raised.push(alarm.id);
  await signIn(page, "viewer");
  await page.goto("/alarms");
  await dismissToasts(page);
  const card = page.locator(`[data-testid="alarm-card"][data-alarm-id="${alarm.id}"]`);
  await expect(card).toBeVisible();
  await expect(card).toContainText("Warning");
  await expect(card).toContainText(alarm.compressorName);
  await expect(card).toContainText(/against limit/);
  await expect(page.locator(`[data-testid="alarm-row"][data-alarm-id="${alarm.id}"]`)).toBeHidden();
  await noSidewaysScroll(page);
  await card.tap();
  await expect(page.getByTestId("alarm-highlight")).toContainText(alarm.compressorName);

  await page.goto("/board");
  await expect(page.getByTestId("compressor-tile").first()).toBeVisible();
  await noSidewaysScroll(page);
  const first = page.getByTestId("compressor-tile").nth(0);
  const second = page.getByTestId("compressor-tile").nth(1);
  const [a, b] = [await first.boundingBox(), await second.boundingBox()];
  expect(b!.y).toBeGreaterThanOrEqual(a!.y + a!.height - 1); // stacked, one per row

  await first.getByRole("heading", { level: 3 }).getByRole("link").tap();
  await expect(page).toHaveURL(/\/compressors\/\d+/);
  await noSidewaysScroll(page);
});

test("a return target on another site is refused after sign-in", async ({ page }) => {
  for (const target of ["https://other.example/", "//other.example/", "/\\other.example/"]) {
    await page.goto(`/login?callbackUrl=${encodeURIComponent(target)}`);
    await fillSignIn(page, "viewer");
    await expect(page).toHaveURL(/^http:\/\/(localhost|127\.0\.0\.1):\d+\/board/);
    await page.context().clearCookies();
  }
});
