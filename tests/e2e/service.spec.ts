import { expect, test } from "@playwright/test";
import { and, eq } from "drizzle-orm";
import { openDatabase } from "@/db/client";
import { alarms, attachments, compressors, sites, users, userSites } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { e2e } from "./env";
import { DEMO_PASSWORD, signIn } from "./helpers";

// Service end to end on the demo data: MB-1 Main's yearly safety-valve test is overdue (seeded 13 months ago), which
// the ingester's sweep has raised as a warning. A technician logs it with a photo; the task leaves the overdue list
// and the alarm clears. A viewer cannot record service; a supervisor of another site cannot download the photo.

/** A 1×1 PNG (PNG specification, W3C 2003). */
const PNG = Buffer.from(
  "89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d49444154789c6360000002000154a24f5d0000000049454e44ae426082",
  "hex",
);
const KEY = "cond:service-overdue:safety-valve-test";

function withDb<T>(fn: (db: ReturnType<typeof openDatabase>) => T): T {
  const db = openDatabase(e2e.databaseUrl);
  try {
    return fn(db);
  } finally {
    db.$client.close();
  }
}

const mbMain = () => withDb((db) => db.select({ id: compressors.id }).from(compressors).where(eq(compressors.deviceId, "mb-main")).get()!.id);
const serviceAlarm = (compressorId: number) =>
  withDb((db) => db.select({ state: alarms.state, active: alarms.active, priority: alarms.priority }).from(alarms).where(and(eq(alarms.compressorId, compressorId), eq(alarms.key, KEY))).all());

test.describe.serial("service", () => {
  // Signing in (bcrypt) and the first server renders are slow on a busy 2-core machine.
  test.setTimeout(120_000);
  let attachmentId = 0;

  test("a technician logs an overdue task with a photo; it leaves the overdue list and its alarm clears", async ({ page }) => {
    const id = mbMain();
    // The ingester sweeps at start: the overdue task is a warning on MB-1 Main.
    await expect.poll(() => serviceAlarm(id).filter((a) => a.active).map((a) => a.priority), { timeout: 20_000 }).toEqual(["warning"]);

    await signIn(page, "technician");
    await page.goto("/service");
    await expect(page.getByTestId("due-table")).toBeVisible({ timeout: 30_000 });
    const row = page.locator('[data-testid="due-row"][data-compressor="MB-1 Main"][data-code="safety-valve-test"]');
    await expect(row).toHaveAttribute("data-status", "overdue");
    // Overdue first.
    await expect(page.getByTestId("due-row").first()).toHaveAttribute("data-status", "overdue");

    await row.getByRole("button", { name: "Log Safety-valve test on MB-1 Main" }).click();
    const form = page.getByTestId("log-form");
    await expect(form.getByLabel("Safety-valve test")).toBeChecked();
    await form.getByLabel("Notes").fill("Lifted at 450 bar, reseated");
    await form.getByLabel(/Photos and PDF/).setInputFiles({ name: "valve-tag.png", mimeType: "image/png", buffer: PNG });
    await form.getByRole("button", { name: "Record service" }).click();
    await expect(page.getByTestId("log-message")).toHaveText("Logged on MB-1 Main. 1 of 1 file attached.");

    await expect(row).toHaveAttribute("data-status", "ok");
    await expect(page.locator('[data-testid="due-row"][data-status="overdue"][data-compressor="MB-1 Main"][data-code="safety-valve-test"]')).toHaveCount(0);
    expect(serviceAlarm(id).filter((a) => a.active)).toEqual([]);

    const entry = page.getByTestId("log-entry").filter({ hasText: "Lifted at 450 bar" });
    const link = entry.getByTestId("attachment-link");
    await expect(link).toHaveText("valve-tag.png");
    attachmentId = Number((await link.getAttribute("href"))!.split("/").pop());
    const res = await page.request.get(`/api/attachments/${attachmentId}`);
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toBe("image/png");
    expect(Buffer.from(await res.body()).equals(PNG)).toBe(true);
  });

  test("a viewer cannot record service", async ({ page }) => {
    await signIn(page, "viewer");
    const res = await page.goto("/service");
    expect(res?.status()).toBe(403);
    await expect(page.getByTestId("log-form")).toHaveCount(0);
    const upload = await page.request.post(`/api/attachments?ownerKind=service_log&ownerId=1`, {
      multipart: { file: { name: "x.png", mimeType: "image/png", buffer: PNG } },
    });
    expect(upload.status()).toBe(403);
  });

  test("a supervisor of another site cannot download the photo; one of every site can", async ({ page, browser }) => {
    expect(attachmentId).toBeGreaterThan(0);
    const email = "supervisor.heronfold@airkeep.demo";
    const hash = await hashPassword(DEMO_PASSWORD);
    withDb((db) => {
      const heronfold = db.select({ id: sites.id }).from(sites).where(eq(sites.code, "heronfold-ridge")).get()!.id;
      const now = Date.now();
      const u = db.insert(users).values({ email, name: "Hal Supervisor", passwordHash: hash, role: "supervisor", createdAt: now, updatedAt: now }).returning().get();
      db.insert(userSites).values({ userId: u.id, siteId: heronfold }).run();
      expect(db.select().from(attachments).where(eq(attachments.id, attachmentId)).get()?.status).toBe("stored");
    });
    await page.goto("/login");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page).toHaveURL(/\/board/);
    const refused = await page.request.get(`/api/attachments/${attachmentId}`);
    expect(refused.status()).toBe(404);
    await page.goto("/service");
    await expect(page.getByTestId("log-entry").filter({ hasText: "Lifted at 450 bar" })).toHaveCount(0);

    const other = await browser.newPage();
    await signIn(other, "supervisor");
    expect((await other.request.get(`/api/attachments/${attachmentId}`)).status()).toBe(200);
    await other.close();
  });
});
