import fs from "node:fs";
import { randomBytes } from "node:crypto";
import { expect, test } from "@playwright/test";
import { connectAsync, type MqttClient } from "mqtt";
import { openDatabase } from "@/db/client";
import { createReadingStore } from "@/db/readings";
import { denialReason } from "@/shared/roles";
import { runStateCode, topicFor, type ReadingInput } from "@/shared/telemetry";
import { e2e } from "./env";
import { signIn } from "./helpers";

// Threshold tuning end to end: an engineer lowers a warning limit on one compressor, the backtest over the history
// seeded below shows more alarms with the new value, the change is saved, and a reading published over MQTT with the
// device's own credential past the new limit raises the alarm in the live engine (no restart). The demo runs without
// its simulator here; this file is the only one publishing for, or writing history of, the unit it uses.

type Device = { deviceId: string; secret: string; siteCode: string; compressorId: number; name: string; stages: number };

const DEVICE = "cr-bank";
const KEY = "intakeC.high.warning";
const mqttUrl = process.env.E2E_MQTT_URL ?? `mqtt://127.0.0.1:${e2e.mqttPort}`;
const devicesFile = process.env.E2E_DEVICES_FILE ?? e2e.devicesFile;

function device(deviceId: string): Device {
  const { devices } = JSON.parse(fs.readFileSync(devicesFile, "utf8")) as { devices: Device[] };
  const d = devices.find((x) => x.deviceId === deviceId);
  if (!d) throw new Error(`${deviceId} is not in ${devicesFile}`);
  return d;
}

/**
 * Three hours of history straight into the e2e database (raw readings and their rollups, as the ingester stores them):
 * running, intake air at 20 °C with twelve 3-minute warm spells at 33 °C — under the template's 40 °C warning, over 30.
 */
function seedHistory(d: Device): number {
  const db = openDatabase(e2e.databaseUrl);
  try {
    const end = Date.now() - 10 * 60_000;
    const rows: ReadingInput[] = [];
    for (let i = 0; i < 3 * 720; i++) {
      const ts = end - (3 * 720 - i) * 5000;
      const warm = i % 180 >= 100 && i % 180 < 136;
      rows.push({
        compressorId: d.compressorId,
        ts,
        seq: i,
        deliveryBar: 300,
        stage1Bar: null,
        stage2Bar: null,
        stage3Bar: null,
        stage4Bar: null,
        stage1C: 90,
        stage2C: 110,
        stage3C: 120,
        stage4C: d.stages > 3 ? 125 : null,
        oilBar: 4.1,
        purifierC: 22,
        intakeC: warm ? 33 : 20,
        runState: runStateCode.running,
        motorOn: 1,
        hourMeterH: 4000 + i / 720,
        starts: 50,
        tripCode: null,
      });
    }
    createReadingStore(db).insert(rows);
    return rows.filter((r, k) => r.intakeC === 33 && rows[k - 1]?.intakeC !== 33).length;
  } finally {
    db.$client.close();
  }
}

const clients: MqttClient[] = [];
test.afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => undefined)));
});

test("an engineer lowers a warning limit, sees the backtest grow, saves, and the live engine raises at the new limit", async ({ page }) => {
  test.setTimeout(90_000);
  const d = device(DEVICE);
  const spells = seedHistory(d);
  expect(spells).toBe(12);

  await signIn(page, "engineer");
  await page.goto(`/thresholds?compressor=${d.compressorId}`);
  await expect(page.getByTestId("set-title")).toHaveText(d.name);
  const line = page.locator(`[data-testid="limit-line"][data-key="${KEY}"]`);
  await expect(line).toHaveAttribute("data-state", "inherits");
  await expect(page.getByTestId("save-blocker")).toHaveText("Nothing changed yet.");

  // Override the inherited 40 °C warning: 30 °C, 5 s on-delay.
  await line.getByLabel("Intake temperature high warning: setting").selectOption("own");
  await expect(line).toHaveAttribute("data-state", "overridden");
  await line.getByLabel("Intake temperature high warning: limit in °C").fill("30");
  await line.getByLabel("Intake temperature high warning: on-delay in s").fill("5");
  // A value past the sensor's range is refused at its field.
  await line.getByLabel("Intake temperature high warning: limit in °C").fill("95");
  await expect(line.getByText("Outside the sensor's range, -50 °C to 80 °C")).toBeVisible();
  await line.getByLabel("Intake temperature high warning: limit in °C").fill("30");
  await expect(page.getByTestId("save-blocker")).toHaveText("Run the backtest of these limits first.");

  // Backtest over the last 24 hours: none of the warm spells reaches 40 °C, every one passes 30 °C.
  const backtest = page.getByTestId("backtest");
  await backtest.getByText("24h").click();
  await page.getByTestId("backtest-run").click();
  await expect(page.getByTestId("backtest-summary")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("backtest-warning-old")).toHaveText("0");
  await expect(page.getByTestId("backtest-warning-new")).toHaveText(String(spells));
  await expect(page.getByTestId("backtest-warning-change")).toHaveText(`+${spells}`);
  await expect(page.getByTestId("backtest-source")).toContainText("Raw readings");
  await expect(page.getByTestId("backtest-chart")).toBeVisible();

  await page.getByLabel("Reason for the change").fill("Plant-room ventilation is weak in summer: warn earlier");
  await expect(page.getByTestId("save-blocker")).toHaveText("");
  await page.getByTestId("save-thresholds").click();
  await expect(page.getByRole("status").filter({ hasText: "Saved as version" })).toBeVisible();
  await expect(line).toHaveAttribute("data-state", "overridden");

  // The history tab lists the change with its reason.
  await page.getByRole("tab", { name: "History" }).click();
  await expect(page.getByTestId("history-entry").first()).toContainText("Plant-room ventilation is weak in summer");
  await expect(page.getByTestId("history-entry").first()).toContainText("Intake temperature high warning");

  // The device publishes 35 °C intake air, once a second: past 30 °C, under the 40 °C it had before.
  const client = await connectAsync(mqttUrl, {
    username: d.deviceId,
    password: d.secret,
    clientId: `${d.deviceId}:e2e-${randomBytes(4).toString("hex")}`,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 10_000,
  });
  clients.push(client);
  let seq = 10_000;
  const publish = () =>
    client.publishAsync(
      topicFor(d.siteCode, d.deviceId, "telemetry"),
      JSON.stringify({
        v: 1,
        seq: seq++,
        ts: Date.now(),
        runState: "running",
        motorOn: true,
        deliveryBar: 300,
        stageC: Array.from({ length: d.stages }, (_, i) => 90 + i * 10),
        oilBar: 4.1,
        purifierC: 22,
        intakeC: 35,
        hourMeterH: 4010,
        starts: 50,
        tripCode: null,
      }),
      { qos: 1 },
    );
  const timer = setInterval(() => void publish().catch(() => undefined), 1000);
  try {
    await publish();
    await expect
      .poll(
        async () => {
          const res = await page.request.get(`/api/alarms?compressor=${d.compressorId}`);
          const body = (await res.json()) as { alarms?: { key: string; limitValue: number | null; state: string }[] };
          return body.alarms?.find((a) => a.key === KEY) ?? null;
        },
        { timeout: 20_000, intervals: [500] },
      )
      .toMatchObject({ key: KEY, limitValue: 30, state: "active-unacknowledged" });
  } finally {
    clearInterval(timer);
  }
});

test("a technician sees the limits but cannot save; a forged save action is refused", async ({ page }) => {
  const d = device(DEVICE);
  await signIn(page, "technician");
  await page.goto(`/thresholds?compressor=${d.compressorId}`);
  await expect(page.getByTestId("save-thresholds")).toBeDisabled();
  await expect(page.getByTestId("save-blocker")).toHaveText(denialReason("thresholds.edit"));

  // The call the Save button makes, forged with the technician's session.
  const manifest = JSON.parse(fs.readFileSync(".next/server/server-reference-manifest.json", "utf8")) as {
    node: Record<string, { exportedName?: string }>;
  };
  const actionId = Object.entries(manifest.node).find(([, a]) => a.exportedName === "saveThresholds")?.[0];
  expect(actionId, "saveThresholds server action in the build").toBeTruthy();
  const text = await page.evaluate(
    async ({ actionId, compressorId }) => {
      const res = await fetch(`/thresholds?compressor=${compressorId}`, {
        method: "POST",
        headers: { "Next-Action": actionId!, Accept: "text/x-component", "Content-Type": "text/plain;charset=UTF-8" },
        body: JSON.stringify([{ scopeType: "compressor", scopeId: compressorId, baseVersion: 0, reason: "Forged change", limits: [] }]),
      });
      return res.text();
    },
    { actionId, compressorId: d.compressorId },
  );
  expect(text).toContain('"status":403');

  // A supervisor does not get the page at all.
  await signIn(page, "supervisor");
  expect((await page.goto("/thresholds"))?.status()).toBe(403);
});
