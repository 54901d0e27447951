import fs from "node:fs";
import { randomBytes } from "node:crypto";
import { expect, test, type Locator, type Page } from "@playwright/test";
import { connectAsync, type IClientOptions, type MqttClient } from "mqtt";
import { timeToStopMinutes } from "@/shared/board";
import { topicFor } from "@/shared/telemetry";
import { pressureDecimals, pressureFromBar, type PressureUnit } from "@/shared/units";
import { e2e } from "./env";
import { signIn } from "./helpers";

// The board end to end: readings published over MQTT with a device's own credential reach the tile without a
// reload; a device's last will turns its tile Offline; a display link opens the kiosk board and is refused once
// revoked. The demo runs without its simulator here, so only this file publishes for the devices it uses.

type Device = {
  deviceId: string;
  secret: string;
  siteCode: string;
  compressorId: number;
  name: string;
  stages: number;
  stopPressureBar: number;
};

const mqttUrl = process.env.E2E_MQTT_URL ?? `mqtt://127.0.0.1:${e2e.mqttPort}`;
const devicesFile = process.env.E2E_DEVICES_FILE ?? e2e.devicesFile;

function device(deviceId: string): Device {
  const { devices } = JSON.parse(fs.readFileSync(devicesFile, "utf8")) as { devices: Device[] };
  const d = devices.find((x) => x.deviceId === deviceId);
  if (!d) throw new Error(`${deviceId} is not in ${devicesFile}`);
  return d;
}

const clients: MqttClient[] = [];

async function connectDevice(d: Device, extra: Partial<IClientOptions> = {}): Promise<MqttClient> {
  const client = await connectAsync(mqttUrl, {
    username: d.deviceId,
    password: d.secret,
    clientId: `${d.deviceId}:e2e-${randomBytes(4).toString("hex")}`,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 10_000,
    ...extra,
  });
  clients.push(client);
  return client;
}

let seq = 1;

function telemetry(d: Device, deliveryBar: number, ts: number, running: boolean) {
  return JSON.stringify({
    v: 1,
    seq: seq++,
    ts,
    runState: running ? "running" : "standby",
    motorOn: running,
    deliveryBar,
    stageC: Array.from({ length: d.stages }, (_, i) => 90 + i * 25),
    oilBar: 4.2,
    purifierC: 21,
    intakeC: 17,
    hourMeterH: 1234.5,
    starts: 321,
    tripCode: null,
  });
}

async function publishReading(client: MqttClient, d: Device, deliveryBar: number, opts: { ts?: number; running?: boolean } = {}) {
  const payload = telemetry(d, deliveryBar, opts.ts ?? Date.now(), opts.running ?? true);
  await client.publishAsync(topicFor(d.siteCode, d.deviceId, "telemetry"), payload, { qos: 1 });
}

/** A pressure as the tile shows it, in the signed-in person's unit (read from the units picker; bar on a kiosk). */
async function shown(page: Page, bar: number): Promise<string> {
  const picker = page.getByLabel("Pressure unit");
  const unit = ((await picker.count()) ? await picker.inputValue() : "bar") as PressureUnit;
  return pressureFromBar(bar, unit).toFixed(pressureDecimals[unit]);
}

function tileOf(page: Page, d: Device): Locator {
  return page.locator(`[data-testid="compressor-tile"][data-compressor-id="${d.compressorId}"]`);
}

test.afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => undefined)));
});

test("the board shows each reading as it arrives, without a reload", async ({ page }) => {
  const d = device("mb-main");
  await signIn(page, "supervisor");
  await expect(page.getByTestId("live-status")).toHaveText("Live");
  await expect(page.getByTestId("safety-notice")).toContainText("not a safety device");
  await page.evaluate(() => Object.assign(window, { __sameDocument: true }));

  const client = await connectDevice(d);
  const tile = tileOf(page, d);
  const start = Date.now() - 30_000;
  await publishReading(client, d, 123.4, { ts: start, running: false });
  await expect(tile.getByTestId("delivery-value")).toHaveText(await shown(page, 123.4));
  await expect(tile.getByTestId("state-word")).toHaveText("Standby");
  await expect(tile).toHaveAttribute("data-freshness", "live");
  await expect(tile.getByTestId("reading-age")).toHaveText(/^\d+ s ago$/);
  await expect(tile.getByTestId("to-stop-value")).toHaveText("—");

  // A fill: 0.5 bar every 2 s (15 bar/min). Nothing is projected until the rate is steady over a minute of the run.
  const t0 = start + 2_000;
  for (let i = 0; i <= 10; i++) await publishReading(client, d, 340 + i / 2, { ts: t0 + i * 2_000 });
  await expect(tile.getByTestId("delivery-value")).toHaveText(await shown(page, 345));
  await expect(tile.getByTestId("state-word")).toHaveText("Running");
  await expect(tile.getByTestId("to-stop-value")).toHaveText("—");
  for (let i = 11; i <= 30; i++) await publishReading(client, d, 340 + i / 2, { ts: t0 + i * 2_000 });
  await expect(tile.getByTestId("delivery-value")).toHaveText(await shown(page, 355));
  // projected with real gas from the same shared function; a straight line would say (stop − 355) / 15
  const live = { runState: "running" as const, deliveryBar: 355, fillRateBarPerMin: 15, intakeC: 17 };
  const minutes = timeToStopMinutes(live, d.stopPressureBar, 200)!;
  expect(minutes).toBeLessThan(0.9 * ((d.stopPressureBar - 355) / 15));
  await expect(tile.getByTestId("to-stop-value")).toHaveText(String(Math.round(minutes)));

  expect(await page.evaluate(() => (window as unknown as { __sameDocument?: boolean }).__sameDocument)).toBe(true);
});

test("a compressor whose device drops off turns Offline and its numbers are no longer shown as live", async ({ page }) => {
  const d = device("hr-bay");
  await signIn(page, "viewer");
  await expect(page.getByTestId("live-status")).toHaveText("Live");
  const status = topicFor(d.siteCode, d.deviceId, "status");
  const client = await connectDevice(d, {
    will: { topic: status, payload: Buffer.from(JSON.stringify({ v: 1, status: "offline" })), qos: 1, retain: true },
  });
  await client.publishAsync(status, JSON.stringify({ v: 1, status: "online", ts: Date.now() }), { qos: 1, retain: true });
  await publishReading(client, d, 250.5);
  const tile = tileOf(page, d);
  await expect(tile.getByTestId("delivery-value")).toHaveText(await shown(page, 250.5));
  await expect(tile.getByTestId("state-word")).toHaveText("Running");

  // The connection breaks without a DISCONNECT: the broker publishes the device's last will.
  client.stream.destroy();
  await expect(tile.getByTestId("state-word")).toHaveText("Offline");
  await expect(tile).toHaveAttribute("data-freshness", "offline");
  await expect(tile.getByTestId("reading-age")).toHaveText(/^Last reading \d+ s ago$/);
  await expect(tile.getByTestId("to-stop-value")).toHaveText("—");
});

test("a tile opens the compressor page with its live values and trend", async ({ page }) => {
  const d = device("mb-main");
  await signIn(page, "technician");
  await tileOf(page, d).getByRole("link", { name: d.name, exact: true }).click();
  await expect(page).toHaveURL(new RegExp(`/compressors/${d.compressorId}$`));
  await expect(page.getByTestId("compressor-name")).toHaveText(d.name);
  await expect(page.getByTestId("trend-source")).toContainText("raw readings");
  await page.getByRole("button", { name: "7d" }).click();
  await expect(page.getByTestId("trend-source")).toContainText("1-minute rollups");
  await expect(page.getByTestId("safety-notice")).toBeVisible();
  expect((await page.request.get(`/api/compressors/999999/trend?signal=deliveryBar&span=1h`)).status()).toBe(404);
});

test("a display link opens the kiosk board, and is refused once revoked", async ({ page, browser }) => {
  const d = device("cr-fill");
  const label = `Wall ${randomBytes(3).toString("hex")}`;
  await signIn(page, "admin");
  await page.goto("/admin/displays");
  await page.getByRole("button", { name: "New display link" }).click();
  await page.getByLabel("Label").fill(label);
  await page.getByRole("group", { name: "Sites shown" }).getByLabel("Cobalt Reef Dive Centre").check();
  await page.getByRole("button", { name: "Create link" }).click();
  const url = await page.getByTestId("display-link-url").inputValue();
  expect(url).toMatch(/\/display\/[A-Za-z0-9_-]{43}$/);
  const path = new URL(url).pathname;
  const token = path.split("/").pop()!;

  // A fresh browser context: no session cookie.
  const kioskContext = await browser.newContext();
  const kiosk = await kioskContext.newPage();
  const res = await kiosk.goto(path);
  expect(res?.status()).toBe(200);
  await expect(kiosk.getByRole("heading", { level: 1 })).toHaveText(label);
  await expect(kiosk.getByTestId("live-status")).toHaveText("Live");
  await expect(kiosk.getByRole("navigation")).toHaveCount(0);
  await expect(kiosk.getByTestId("safety-notice")).toContainText("not a safety device");
  await expect(kiosk.getByTestId("board-site")).toHaveCount(1);
  await expect(kiosk.getByTestId("board-site")).toHaveAttribute("data-site-code", d.siteCode);
  await expect(tileOf(kiosk, d).getByRole("link")).toHaveCount(0);

  const client = await connectDevice(d);
  await publishReading(client, d, 211.1);
  await expect(tileOf(kiosk, d).getByTestId("delivery-value")).toHaveText(await shown(kiosk, 211.1));

  const row = page.getByTestId("display-link-row").filter({ hasText: label });
  await page.getByRole("button", { name: "Done" }).click();
  await row.getByRole("button", { name: `Revoke ${label}` }).click();
  await row.getByRole("button", { name: "Confirm revoke" }).click();
  await expect(row).toContainText("Revoked");

  const revoked = await kiosk.reload();
  expect([403, 410]).toContain(revoked?.status());
  await expect(kiosk.getByRole("heading", { name: "This display link has been revoked" })).toBeVisible();
  const live = await kiosk.request.get(`/api/display-links/${token}/live-token`);
  expect([403, 410]).toContain(live.status());
  expect((await kiosk.request.get(`/api/display-links/${token}/board`)).status()).toBe(410);
  await kioskContext.close();
});

test("the live token needs a session and a same-origin request", async ({ page }) => {
  expect((await page.request.get("/api/live/token")).status()).toBe(401);
  await signIn(page, "viewer");
  const ok = await page.request.get("/api/live/token");
  expect(ok.status()).toBe(200);
  expect(await ok.json()).toMatchObject({ url: expect.stringMatching(/^wss?:\/\//), token: expect.any(String) });
  const foreign = await page.request.get("/api/live/token", { headers: { origin: "http://evil.example" } });
  expect(foreign.status()).toBe(403);
});
