import fs from "node:fs";
import Database from "better-sqlite3";
import { expect, test } from "@playwright/test";
import { monthLabel, monthWindow, previousMonth } from "@/shared/month";
import { e2e } from "./env";
import { signIn } from "./helpers";

// The monthly report end to end. The demo runs without its simulator, so this file writes last month's history for
// one compressor straight into the end-to-end database, as the ingester would have: hourly and minute rollups for
// one day with a three-hour trip (10:00–13:00 site time, trip 110) and the machine's trip and reset events.

const DEVICE = "mb-main"; // MB-1 Main at Marrow Bay Fire Station (Europe/London)
const ZONE = "Europe/London";
const H = 3_600_000;

let compressorId = 0;
let siteId = 0;
let month = "";
let tripStart = 0;
let tripEnd = 0;

test.beforeAll(() => {
  const db = new Database(e2e.databaseUrl);
  db.pragma("busy_timeout = 5000");
  try {
    const row = db.prepare("SELECT id, site_id AS siteId FROM compressors WHERE device_id = ?").get(DEVICE) as { id: number; siteId: number };
    compressorId = row.id;
    siteId = row.siteId;
    // Last month at the site, as the report page picks it by default (its first site is in Europe/Malta, the same
    // month as London except in the hour around midnight at a month's end; then the test names the month itself).
    month = previousMonth(Date.now(), ZONE);
    const w = monthWindow(month, ZONE);
    const day = w.days[9]!; // the 10th, site time
    tripStart = day.from + 10 * H;
    tripEnd = day.from + 13 * H;
    const hour = db.prepare(
      `INSERT OR REPLACE INTO readings_1h (compressor_id, bucket_ts, n, covered_s, run_s, tripped_s, last_ts, hour_meter_h, starts, last_run_state, last_motor_on)
       VALUES (?, ?, 3600, 3600, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const minute = db.prepare(
      `INSERT OR REPLACE INTO readings_1m (compressor_id, bucket_ts, n, covered_s, run_s, tripped_s, last_ts, hour_meter_h, starts, last_run_state, last_motor_on)
       VALUES (?, ?, 60, 60, ?, ?, ?, ?, ?, ?, ?)`,
    );
    db.transaction(() => {
      for (let t = day.from; t < day.to; t += 60_000) {
        const tripped = t >= tripStart && t < tripEnd;
        const running = !tripped && (t - day.from) % (2 * H) < 30 * 60_000;
        const hours = (t - day.from) / H;
        minute.run(compressorId, t, running ? 60 : 0, tripped ? 60 : 0, t + 59_000, 1200 + hours, 400, tripped ? 4 : running ? 3 : 1, running ? 1 : 0);
        if ((t - day.from) % H === 0) {
          const h = (t - day.from) / H;
          const trippedH = h >= 10 && h < 13;
          hour.run(compressorId, t, trippedH ? 0 : 1800, trippedH ? 3600 : 0, t + H - 1000, 1200 + h + 1, 400, trippedH ? 4 : 1, 0);
        }
      }
      const ev = db.prepare(
        "INSERT OR IGNORE INTO device_events (ts, compressor_id, kind, run_state, trip_code, text, received_at) VALUES (?, ?, ?, ?, ?, ?, ?)",
      );
      ev.run(tripStart, compressorId, "trip", "tripped", 110, "Trip: Final stage over-temperature", tripStart);
      ev.run(tripEnd, compressorId, "state", "standby", null, "Trip reset", tripEnd);
      db.prepare("INSERT INTO events (ts, kind, action, priority, site_id, compressor_id, text) VALUES (?, 'trip', 'trip.report', 'critical', ?, ?, ?)").run(
        tripStart,
        siteId,
        compressorId,
        "MB-1 Main tripped: final stage over-temperature (report test)",
      );
    })();
  } finally {
    db.close();
  }
});

test("a manager opens last month's report, drills into the outage and downloads the CSV", async ({ page }) => {
  await signIn(page, "manager");
  await page.goto(`/reports?month=${month}&scope=site-${siteId}`);
  await expect(page.getByRole("heading", { name: "Monthly report" })).toBeVisible();
  await expect(page.getByTestId("report-title")).toContainText(monthLabel(month));
  await expect(page).toHaveTitle(`Report · ${monthLabel(month)} · Airkeep`);
  await expect(page.getByTestId("report-title")).toContainText("Marrow Bay Fire Station");
  await expect(page.getByTestId("report-period").first()).toContainText("Europe/London");
  await expect(page.getByTestId("headline-failures").locator(".num")).toHaveText("1");
  await expect(page.getByTestId("headline-longest")).toContainText("3 h 00 min");
  await expect(page.getByTestId("planned-service-line")).toContainText("No planned service recorded.");
  // MTBF on both bases, each labelled; a compressor without data reads "no data", never 0.00 %.
  await expect(page.getByTestId("headline-mtbf")).toContainText("MTBF, running-time basis");
  await expect(page.getByTestId("headline-mtbf-up")).toContainText("MTBF, up-time basis");
  const table = page.getByTestId("availability-table");
  await expect(table).toContainText("MTBF (up time) h");
  await expect(table).toContainText("no data");

  const outage = page.getByTestId("outage-trip").filter({ hasText: "MB-1 Main" });
  await expect(outage).toHaveCount(1);
  await expect(outage).toContainText("Trip 110: Final stage over-temperature");

  // Drill from the outage to the event log around it.
  await outage.getByTestId("outage-events-link").click();
  await expect(page).toHaveURL(new RegExp(`/events\\?compressor=${compressorId}&from=${tripStart - 600_000}&to=${tripEnd + 600_000}$`));

  // Back to the report: the month-to-month and alarm-load charts, and the outage table as CSV.
  await page.goBack();
  await expect(page.getByTestId("outages-table")).toBeVisible();
  await expect(page.getByTestId("comparison-chart").locator(".recharts-line")).toHaveCount(1);
  await expect(page.getByTestId(`alarm-load-${siteId}`).getByText(/No alarms in this period|Critical/).first()).toBeVisible();
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("csv-outages").click()]);
  expect(download.suggestedFilename()).toBe(`airkeep-outages-site-${siteId}-${month}.csv`);
  const csv = fs.readFileSync((await download.path())!, "utf8");
  expect(csv).toContain("kind,compressor,site,time_zone,start_local,end_local");
  expect(csv).toMatch(/trip,MB-1 Main,Marrow Bay Fire Station,Europe\/London,\d{4}-\d{2}-10 10:00,\d{4}-\d{2}-10 13:00,.*,3,3,Trip 110: Final stage over-temperature,110,true/);

  // The printable page: no navigation, the organisation, period, zone and definitions.
  await page.goto(`/reports/print?month=${month}&scope=site-${siteId}`);
  await expect(page.getByTestId("print-report")).toContainText("Period and time zones");
  await expect(page.getByTestId("print-report")).toContainText("Europe/London");
  await expect(page.getByTestId("report-definitions")).toContainText("192-05-13");
  await expect(page.getByRole("navigation", { name: "Main" })).toHaveCount(0);
});

test("the report page opens last month by default", async ({ page }) => {
  await signIn(page, "manager");
  await page.goto("/reports");
  await expect(page.getByTestId("report-title")).toContainText(/Fleet \(3 sites\)/);
  await expect(page.getByTestId("report-month")).toHaveValue(previousMonth(Date.now(), "Europe/Malta"));
});

test("a viewer cannot open reports", async ({ page }) => {
  await signIn(page, "viewer");
  const res = await page.goto("/reports");
  expect(res?.status()).toBe(403);
  await expect(page.getByRole("heading", { name: "Not allowed" })).toBeVisible();
  await expect(page.getByRole("link", { name: "Reports" })).toHaveCount(0);
  expect((await page.request.get(`/api/reports?month=${month}&scope=fleet`)).status()).toBe(403);
  expect((await page.request.get(`/api/reports/csv/outages?month=${month}&scope=fleet`)).status()).toBe(403);
  expect((await page.goto(`/reports/print?month=${month}&scope=fleet`))?.status()).toBe(403);
});
