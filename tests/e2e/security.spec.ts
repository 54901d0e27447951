import fs from "node:fs";
import { expect, test, type Page } from "@playwright/test";
import { DEMO_PASSWORD, signIn } from "./helpers";

// Sign-in redirects, security headers, framing, ended sessions and oversized action bodies, in the browser against
// the built app behind Airkeep's own web server.

async function fillSignIn(page: Page, email: string) {
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
}

test("an alarm link opened while signed out lands on that alarm page after sign-in", async ({ page }) => {
  await page.goto("/alarms?id=1&site=2");
  await expect(page).toHaveURL(/\/login\?callbackUrl=%2Falarms%3Fid%3D1%26site%3D2$/);
  await fillSignIn(page, "technician@airkeep.demo");
  await expect(page).toHaveURL(/\/alarms\?id=1&site=2$/);
  await expect(page.getByTestId("signed-in-as")).toBeVisible();
});

for (const callback of ["/%5Cevil.example/", "/%09/evil.example/", "//evil.example/", "https://evil.example/"]) {
  test(`sign-in never leaves the site for callbackUrl=${callback}`, async ({ page, baseURL }) => {
    await page.route((url) => url.hostname === "evil.example", (route) => route.fulfill({ status: 200, body: "left the site" }));
    await page.goto(`/login?callbackUrl=${callback}`);
    await fillSignIn(page, "viewer@airkeep.demo");
    await expect(page).toHaveURL(/\/board$/);
    expect(new URL(page.url()).origin).toBe(new URL(baseURL!).origin);
  });
}

test("pages carry a nonce Content-Security-Policy and the other security headers, and still work under it", async ({ page }) => {
  const violations: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to (execute|load|connect)/i.test(m.text())) violations.push(m.text());
  });
  const login = await page.goto("/login");
  const csp = login!.headers()["content-security-policy"] ?? "";
  expect(csp).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
  expect(csp).toContain("frame-ancestors 'none'");
  expect(csp).not.toContain("unsafe-eval");
  expect(login!.headers()["x-content-type-options"]).toBe("nosniff");
  expect(login!.headers()["referrer-policy"]).toBe("same-origin");
  // Served over plain HTTP here: no HSTS.
  expect(login!.headers()["strict-transport-security"]).toBeUndefined();
  const nonce = /'nonce-([^']+)'/.exec(csp)![1];
  expect(await page.locator(`script[nonce]`).count()).toBeGreaterThan(0);
  // Each page gets its own nonce.
  const again = (await page.request.get("/login")).headers()["content-security-policy"];
  expect(again).not.toContain(nonce);

  await fillSignIn(page, "supervisor@airkeep.demo");
  await expect(page).toHaveURL(/\/board$/);
  await expect(page.getByTestId("board-site").first()).toBeVisible();
  await expect(page.getByTestId("live-status")).toHaveText("Live");
  await page.getByTestId("board-site").first().getByRole("link").first().click();
  await expect(page).toHaveURL(/\/compressors\/\d+/);
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
  expect(violations).toEqual([]);

  const api = await page.request.get("/api/sites");
  expect(api.headers()["x-content-type-options"]).toBe("nosniff");
});

test("a page of the same site cannot frame a signed-in admin screen", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/board");
  const framed = await page.evaluate(async () => {
    const frame = document.createElement("iframe");
    frame.src = "/admin/users";
    const loaded = new Promise((r) => frame.addEventListener("load", r));
    document.body.append(frame);
    await loaded;
    try {
      return frame.contentDocument?.body?.innerText ?? "";
    } catch {
      return "";
    }
  });
  expect(framed).not.toContain("admin@airkeep.demo");
});

test("next-auth's session endpoint gives nobody for the cookie of a signed-out session", async ({ page, browser }) => {
  await signIn(page, "engineer");
  const cookies = await page.context().cookies();
  expect((await (await page.request.get("/api/auth/session")).json()).user?.email).toBe("engineer@airkeep.demo");
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/login/);

  // The old cookie, replayed from elsewhere.
  const other = await browser.newContext();
  await other.addCookies(cookies);
  const res = await other.request.get("/api/auth/session");
  expect(res.status()).toBe(200);
  expect(await res.json()).toEqual({});
  expect((await other.request.get("/api/sites")).status()).toBe(401);
  await other.close();
});

test("an oversized server-action body is refused with 413, not a server error", async ({ page }) => {
  await signIn(page, "admin");
  const manifest = JSON.parse(fs.readFileSync(".next/server/server-reference-manifest.json", "utf8")) as {
    node: Record<string, { exportedName?: string }>;
  };
  const actionId = Object.entries(manifest.node).find(([, a]) => a.exportedName === "inviteUser")?.[0];
  expect(actionId).toBeTruthy();
  const res = await page.request.post("/admin/users", {
    headers: { "Next-Action": actionId!, Accept: "text/x-component", "Content-Type": "text/plain;charset=UTF-8" },
    data: JSON.stringify([{ email: "big@example.org", name: "x".repeat(2 * 1024 * 1024) }]),
  });
  expect(res.status()).toBe(413);
});

test("GET /api/health gives anyone the bare status and an administrator the details", async ({ page }) => {
  const bare = await (await page.request.get("/api/health")).json();
  expect(Object.keys(bare).sort()).toEqual(["database", "status"]);
  await signIn(page, "admin");
  const full = await (await page.request.get("/api/health")).json();
  expect(full).toHaveProperty("ingester");
  expect(full).toHaveProperty("version");
});
