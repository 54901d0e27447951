import { expect, test } from "@playwright/test";
import { e2e } from "./env";
import { DEMO_PASSWORD } from "./helpers";

test("the live board connects when the app is opened at 127.0.0.1 instead of localhost", async ({ page }) => {
  const origin = `http://127.0.0.1:${e2e.port}`;
  await page.goto(`${origin}/login?callbackUrl=%2Fboard`);
  await page.getByLabel("E-mail").fill("viewer@airkeep.demo");
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  // Sign-in itself returns to /board on the address the page was opened at.
  await expect(page).toHaveURL(`${origin}/board`);
  await expect(page.getByTestId("live-status")).toHaveText("Live");
});
