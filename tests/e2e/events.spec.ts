import fs from "node:fs";
import { expect, test } from "@playwright/test";
import { signIn } from "./helpers";

// The event log end to end: a sign-in is an event of no site (administrators only), found by the person's e-mail,
// and the CSV export of the same search contains it.

test("events search finds a sign-in by the person's e-mail, and the CSV download contains it", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/events");
  await page.getByLabel("Words").fill("admin@airkeep.demo");
  await page.getByRole("button", { name: "Search" }).click();
  await expect(page).toHaveURL(/q=admin%40airkeep\.demo/);
  const row = page.getByTestId("event-row").filter({ hasText: "admin@airkeep.demo signed in" }).first();
  await expect(row).toBeVisible();
  await expect(row).toContainText("Sign-in");

  const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("event-csv").click()]);
  expect(download.suggestedFilename()).toMatch(/^airkeep-events-\d{4}-\d{2}-\d{2}\.csv$/);
  const csv = fs.readFileSync((await download.path())!, "utf8");
  const lines = csv.split("\r\n");
  expect(lines[0]).toBe("time,time_zone,site,compressor,priority,kind,action,actor,text,event_id,compressor_id,alarm_id");
  const signIn_ = lines.find((l) => l.includes("admin@airkeep.demo signed in"));
  expect(signIn_).toBeDefined();
  // Time in ISO 8601 with an offset; kind and action as stored.
  expect(signIn_).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}[+-]\d{2}:\d{2},/);
  expect(signIn_).toContain(",auth,auth.sign_in,admin@airkeep.demo,");
});

test("a person who is not an administrator does not find sign-ins", async ({ page }) => {
  await signIn(page, "supervisor");
  await page.goto("/events?q=supervisor%40airkeep.demo");
  await expect(page.getByTestId("event-status")).toContainText("no events");
  await expect(page.getByText("Sign-ins and account changes are shown to administrators only.")).toBeVisible();
  const res = await page.request.get("/api/events?kind=auth");
  expect(res.status()).toBe(200);
  expect((await res.json()).events).toEqual([]);
});
