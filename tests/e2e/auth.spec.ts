import fs from "node:fs";
import { expect, test, type Page } from "@playwright/test";
import type { Role } from "@/shared/roles";
import { DEMO_PASSWORD, signIn } from "./helpers";

const allNav = ["Board", "Alarms", "Events", "Thresholds", "Service", "Air quality", "Reports", "Admin"];

// What each role is meant to reach, written out here so the permission table itself is under test.
const expectedNav: Record<Role, string[]> = {
  viewer: ["Board", "Alarms", "Events"],
  supervisor: ["Board", "Alarms", "Events", "Service", "Air quality"],
  technician: ["Board", "Alarms", "Events", "Thresholds", "Service", "Air quality"],
  engineer: ["Board", "Alarms", "Events", "Thresholds", "Service", "Air quality", "Reports"],
  manager: ["Board", "Alarms", "Events", "Service", "Air quality", "Reports"],
  admin: allNav,
};

async function navLabels(page: Page): Promise<string[]> {
  return page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents();
}

for (const role of Object.keys(expectedNav) as Role[]) {
  test(`${role} signs in and sees only their navigation`, async ({ page }) => {
    await signIn(page, role);
    await expect(page.getByTestId("signed-in-as")).toContainText(/./);
    expect(await navLabels(page)).toEqual(expectedNav[role]);
    await expect(page.getByTestId("safety-notice")).toContainText("not a safety device");
  });
}

test("a wrong password shows the error and does not sign in", async ({ page }) => {
  await page.goto("/login");
  await page.getByLabel("E-mail").fill("technician@airkeep.demo");
  await page.getByLabel("Password").fill("not-the-password");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("sign-in-error")).toHaveText("Wrong e-mail address or password.");
  await expect(page).toHaveURL(/\/login/);
  const res = await page.request.get("/api/sites");
  expect(res.status()).toBe(401);
});

test("pages and data need a session", async ({ page }) => {
  await page.goto("/board");
  await expect(page).toHaveURL(/\/login\?callbackUrl=%2Fboard/);
  expect((await page.request.get("/api/compressors")).status()).toBe(401);
  const health = await page.request.get("/api/health");
  expect(health.status()).toBe(200);
  expect((await health.json()).database.ok).toBe(true);
});

test("a viewer is refused by an admin page, an admin route handler and an admin server action", async ({ page, browser }) => {
  await signIn(page, "viewer");
  const pageRes = await page.goto("/admin/users");
  expect(pageRes?.status()).toBe(403);
  await expect(page.getByRole("heading", { name: "Not allowed" })).toBeVisible();

  const api = await page.request.get("/api/admin/users");
  expect(api.status()).toBe(403);
  expect((await api.json()).error).toMatch(/administrator/i);

  // Forge the call the admin's invite form makes, with the viewer's session.
  const manifest = JSON.parse(fs.readFileSync(".next/server/server-reference-manifest.json", "utf8")) as {
    node: Record<string, { exportedName?: string; filename?: string }>;
  };
  const actionId = Object.entries(manifest.node).find(([, a]) => a.exportedName === "inviteUser")?.[0];
  expect(actionId, "inviteUser server action in the build").toBeTruthy();
  const email = `forged-${Date.now()}@airkeep.demo`;
  const text = await page.evaluate(
    async ({ actionId, email }) => {
      const res = await fetch("/admin/users", {
        method: "POST",
        headers: { "Next-Action": actionId!, Accept: "text/x-component", "Content-Type": "text/plain;charset=UTF-8" },
        body: JSON.stringify([{ email, name: "Forged", role: "admin", siteIds: [], password: "forged-password-1" }]),
      });
      return res.text();
    },
    { actionId, email },
  );
  expect(text).toContain('"status":403');

  // The refused invitation created nobody: an admin's list does not have it.
  const admin = await browser.newPage();
  await signIn(admin, "admin");
  const users = await (await admin.request.get("/api/admin/users")).json();
  expect(JSON.stringify(users)).not.toContain(email);
  await admin.close();
});

test("a disabled account's open session is refused at its next request", async ({ page, browser }) => {
  await signIn(page, "manager");
  expect((await page.request.get("/api/sites")).status()).toBe(200);

  const admin = await browser.newPage();
  await signIn(admin, "admin");
  await admin.goto("/admin/users");
  const row = admin.getByRole("row").filter({ hasText: "manager@airkeep.demo" });
  await row.getByRole("button", { name: "Disable manager@airkeep.demo" }).click();
  await row.getByRole("button", { name: /Confirm: disable manager@airkeep.demo/ }).click();
  await expect(row).toContainText("Disabled");

  expect((await page.request.get("/api/sites")).status()).toBe(401);
  await page.goto("/login");
  await page.getByLabel("E-mail").fill("manager@airkeep.demo");
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("sign-in-error")).toContainText("disabled");

  await row.getByRole("button", { name: "Enable manager@airkeep.demo" }).click();
  await expect(row).not.toContainText("Disabled");
  await admin.close();
});

test("the units preference sticks across sign-ins", async ({ page, context }) => {
  await signIn(page, "supervisor");
  await Promise.all([
    page.waitForResponse((r) => r.request().method() === "POST" && r.request().headers()["next-action"] !== undefined),
    page.getByLabel("Pressure unit").selectOption("psi"),
  ]);
  await expect(page.getByLabel("Pressure unit")).toHaveValue("psi");
  await context.clearCookies();
  await signIn(page, "supervisor");
  await expect(page.getByLabel("Pressure unit")).toHaveValue("psi");
  await page.getByLabel("Pressure unit").selectOption("bar");
  await expect(page.getByLabel("Pressure unit")).toHaveValue("bar");
});
