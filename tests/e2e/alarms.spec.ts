import { expect, test } from "@playwright/test";
import { denialReason } from "@/shared/roles";
import { closeAlarm, dismissToasts, raiseAlarm } from "./alarm-fixtures";
import { signIn } from "./helpers";

const raised: number[] = [];
test.afterAll(() => {
  for (const id of raised) closeAlarm(id);
});

test("a supervisor acknowledges an alarm with a comment and it changes state", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "hr-workshop", key: "intakeC.high.warning", priority: "warning", signal: "intakeC", value: 47.5, limit: 45 });
  raised.push(alarm.id);
  await signIn(page, "supervisor");
  await page.goto(`/alarms?id=${alarm.id}`);
  const row = page.locator(`[data-testid="alarm-row"][data-alarm-id="${alarm.id}"]`);
  await expect(row).toBeVisible();
  await dismissToasts(page);
  await expect(row).toHaveAttribute("data-state", "active-unacknowledged");
  await expect(row).toContainText("Intake temperature high");
  await expect(row).toContainText("Warning");
  await expect(row).toContainText(alarm.compressorName);

  await row.getByRole("button", { name: /^Acknowledge/ }).click();
  const form = page.getByTestId("alarm-action-form");
  await expect(form).toBeVisible();
  // The comment is optional, but one too short to mean anything is refused at the field.
  await form.getByLabel(/Comment/).fill("ok");
  await form.getByRole("button", { name: "Acknowledge" }).click();
  await expect(form.getByText(/at least 3 characters/)).toBeVisible();
  await form.getByLabel(/Comment/).fill("Plant-room door propped open, intake cooling down");
  await form.getByRole("button", { name: "Acknowledge" }).click();

  await expect(page.getByRole("status").filter({ hasText: "Acknowledged 1 alarm." })).toBeVisible();
  await expect(row).toHaveAttribute("data-state", "active-acknowledged");
  await expect(row.getByTestId("alarm-state")).toHaveText("Active, acknowledged");
  await expect(row).toContainText("Plant-room door propped open");
  await expect(row.getByRole("button", { name: /^Acknowledge/ })).toHaveCount(0);

  // The acknowledgement is in the event log, with the comment.
  await page.goto(`/events?q=${encodeURIComponent("Plant-room door")}`);
  await expect(page.getByTestId("event-row").filter({ hasText: "acknowledged" })).toContainText("Plant-room door propped open");
});

test("a viewer sees the acknowledge control disabled, with the reason, and is told of a new critical alarm", async ({ page }) => {
  const alarm = raiseAlarm({ deviceId: "cr-boat", key: "oilBar.low.critical", priority: "critical", signal: "oilBar", value: 0.6, limit: 1.5 });
  raised.push(alarm.id);
  await signIn(page, "viewer");
  // The announcement comes to any signed-in page, the board included.
  const toast = page.locator(`[data-testid="critical-toast"][data-alarm-id="${alarm.id}"]`);
  await expect(toast).toContainText("Oil pressure low");
  await expect(toast).toContainText("Critical");
  await expect(page.getByTestId("critical-toasts")).toHaveAttribute("aria-live", "assertive");

  await page.goto(`/alarms?id=${alarm.id}`);
  const row = page.locator(`[data-testid="alarm-row"][data-alarm-id="${alarm.id}"]`);
  await expect(row).toBeVisible();
  const ack = row.getByRole("button", { name: /^Acknowledge/ });
  await expect(ack).toBeDisabled();
  const reason = denialReason("alarms.acknowledge");
  await expect(ack).toHaveAccessibleDescription(reason);
  await expect(page.getByTestId("alarm-denials")).toContainText(reason);
  await expect(row.getByRole("button", { name: /^Shelve/ })).toBeDisabled();

  // Seen once per session: a reload does not announce it again.
  await page.reload();
  await expect(row).toBeVisible();
  await expect(toast).toHaveCount(0);
});
