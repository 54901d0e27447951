import { createHash, randomBytes } from "node:crypto";
import Database from "better-sqlite3";
import { expect, test, type Page } from "@playwright/test";
import { e2e } from "./env";

// The supervisor's wall screen: 60 compressors on one 1080p or 4K screen in the dark theme, with no scrolling and
// nothing overlapping. The extra 53 compressors exist only for this file.

const EXTRA = 53;
let token = "";
let linkId = 0;

test.beforeAll(() => {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    db.transaction(() => {
      const base = db.prepare("SELECT site_id AS siteId, model_id AS modelId, stop_pressure_bar AS stop, restart_pressure_bar AS restart FROM compressors ORDER BY id").all() as {
        siteId: number;
        modelId: number;
        stop: number;
        restart: number;
      }[];
      const insert = db.prepare(
        "INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, 0, 0)",
      );
      for (let i = 0; i < EXTRA; i++) {
        const b = base[i % base.length]!;
        insert.run(b.siteId, b.modelId, `WS-${String(i + 1).padStart(2, "0")} Fill unit`, `WALL-TEST-${i}`, `wall-${i}`, b.stop, b.restart);
      }
      token = randomBytes(32).toString("base64url");
      const admin = db.prepare("SELECT id FROM users WHERE role = 'admin' ORDER BY id LIMIT 1").get() as { id: number };
      linkId = Number(
        db
          .prepare("INSERT INTO display_links (token_hash, label, created_by, created_at, theme) VALUES (?, 'Control room wall', ?, ?, 'dark')")
          .run(createHash("sha256").update(token, "utf8").digest("hex"), admin.id, Date.now()).lastInsertRowid,
      );
    })();
  } finally {
    db.close();
  }
});

test.afterAll(() => {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    db.prepare("DELETE FROM display_links WHERE id = ?").run(linkId);
    db.prepare("DELETE FROM compressors WHERE device_id LIKE 'wall-%'").run();
  } finally {
    db.close();
  }
});

type Box = { x: number; y: number; width: number; height: number };
const overlaps = (a: Box, b: Box) => a.x < b.x + b.width - 0.5 && b.x < a.x + a.width - 0.5 && a.y < b.y + b.height - 0.5 && b.y < a.y + a.height - 0.5;
const inside = (inner: Box, outer: Box) =>
  inner.x >= outer.x - 0.5 && inner.y >= outer.y - 0.5 && inner.x + inner.width <= outer.x + outer.width + 0.5 && inner.y + inner.height <= outer.y + outer.height + 0.5;

async function boxes(page: Page, selector: string): Promise<Box[]> {
  return page.$$eval(selector, (els) => els.map((e) => e.getBoundingClientRect()).map((r) => ({ x: r.x, y: r.y, width: r.width, height: r.height })));
}

for (const [width, height] of [
  [1920, 1080],
  [3840, 2160],
] as const) {
  test(`a dark wall screen at ${width} × ${height} shows all 60 compressors without scrolling or overlap`, async ({ page }) => {
    await page.setViewportSize({ width, height });
    await page.goto(`/display/${token}`);
    await expect(page.getByTestId("compressor-tile")).toHaveCount(60);
    await expect(page.getByTestId("board-root")).toHaveAttribute("data-theme", "dark");
    await expect(page.getByTestId("board")).toHaveAttribute("data-font-px", /\d/);
    await expect(page.getByTestId("safety-notice")).toBeInViewport();

    const scroll = await page.evaluate(() => ({ h: document.documentElement.scrollHeight, w: document.documentElement.scrollWidth }));
    expect(scroll.h).toBeLessThanOrEqual(height);
    expect(scroll.w).toBeLessThanOrEqual(width);

    const viewport = { x: 0, y: 0, width, height };
    const tiles = await boxes(page, '[data-testid="compressor-tile"]');
    for (const t of tiles) expect(inside(t, viewport)).toBe(true);
    for (let i = 0; i < tiles.length; i++) for (let j = i + 1; j < tiles.length; j++) expect(overlaps(tiles[i]!, tiles[j]!)).toBe(false);
    const notice = (await boxes(page, '[data-testid="safety-notice"]'))[0]!;
    for (const t of tiles) expect(overlaps(t, notice)).toBe(false);

    // Inside each tile, its texts stay in the tile and do not overlap one another.
    const texts = await page.$$eval('[data-testid="compressor-tile"]', (els) =>
      els.map((tile) => {
        const r = (e: Element) => {
          const b = e.getBoundingClientRect();
          return { x: b.x, y: b.y, width: b.width, height: b.height };
        };
        const parts = ["h3", '[data-testid="reading-age"]', '[data-testid="delivery-value"]', '[data-testid="delivery-band"]', "dl"].map((s) => tile.querySelector(s)).filter((e): e is Element => e !== null);
        return { tile: r(tile), parts: parts.map(r) };
      }),
    );
    for (const { tile, parts } of texts) {
      for (const p of parts) expect(inside(p, tile)).toBe(true);
    }
    const digits = (await boxes(page, '[data-testid="delivery-value"]'))[0]!;
    const fontPx = Number(await page.getByTestId("board").getAttribute("data-font-px"));
    console.log(`${width}×${height}: base font ${fontPx.toFixed(1)} px, delivery digits box ${digits.height.toFixed(0)} px high, tile ${tiles[0]!.width.toFixed(0)}×${tiles[0]!.height.toFixed(0)} px`);
    expect(digits.height).toBeGreaterThanOrEqual(height / 60);
  });
}

test("the board offers full screen and a dark theme to a signed-in supervisor", async ({ page }) => {
  await page.goto("/login");
  await page.getByLabel("E-mail").fill("supervisor@airkeep.demo");
  await page.getByLabel("Password").fill("airkeep-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/board/);
  await page.getByTestId("board-theme").click();
  await expect(page.getByTestId("board-root")).toHaveAttribute("data-theme", "dark");
  await page.reload();
  await expect(page.getByTestId("board-root")).toHaveAttribute("data-theme", "dark");
  await expect(page.getByTestId("board-fullscreen")).toBeVisible();
  await page.getByTestId("board-theme").click();
  await expect(page.getByTestId("board-root")).toHaveAttribute("data-theme", "light");
});
