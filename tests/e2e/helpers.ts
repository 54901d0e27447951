import { expect, type Page } from "@playwright/test";
import type { Role } from "@/shared/roles";

export const DEMO_PASSWORD = "airkeep-demo";

export async function signIn(page: Page, role: Role, password = DEMO_PASSWORD) {
  await page.goto("/login");
  await page.getByLabel("E-mail").fill(`${role}@airkeep.demo`);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/board/);
  await expect(page.getByTestId("signed-in-as")).toBeVisible();
}
