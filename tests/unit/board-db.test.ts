import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadBoard, loadLiveState } from "@/db/board";
import { openDatabase, type Db } from "@/db/client";
import { createCompressor, createModel } from "@/db/compressors";
import { createDisplayLink, hashDisplayToken, listDisplayLinks, resolveDisplayLink, revokeDisplayLink } from "@/db/display-links";
import { runMigrations } from "@/db/migrate";
import { createReadingStore } from "@/db/readings";
import { createSite } from "@/db/sites";
import { createTelemetryStateWriter } from "@/db/telemetry-state";
import { listDeviceEvents, readTrend } from "@/db/trends";
import { createUser } from "@/db/users";
import { trendSpanMs } from "@/shared/board";
import type { ReadingInput } from "@/shared/telemetry";

let db: Db;
let c1: number;
let c2: number;
let siteA: number;
let siteB: number;
let adminId: number;
const NOW = Date.UTC(2025, 2, 14, 12, 0, 0);

function reading(compressorId: number, ts: number, deliveryBar: number): ReadingInput {
  return {
    compressorId,
    ts,
    seq: ts / 1000,
    deliveryBar,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: 90,
    stage2C: 120,
    stage3C: 150,
    stage4C: null,
    oilBar: 4,
    purifierC: 20,
    intakeC: 15,
    runState: 3,
    motorOn: 1,
    hourMeterH: 100,
    starts: 10,
    tripCode: null,
  };
}

beforeAll(() => {
  db = openDatabase(":memory:");
  runMigrations(db);
  siteA = createSite(db, { name: "Alpha", code: "alpha", timeZone: "Europe/London", address: "" }).id;
  siteB = createSite(db, { name: "Bravo", code: "bravo", timeZone: "Europe/Oslo", address: "" }).id;
  const model = createModel(db, { name: "Test 330", maker: "", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330 });
  const base = { modelId: model.id, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 100, inService: true };
  c1 = createCompressor(db, { ...base, name: "A-1", siteId: siteA, serial: "S-1", deviceId: "a-1" }).id;
  c2 = createCompressor(db, { ...base, name: "B-1", siteId: siteB, serial: "S-2", deviceId: "b-1" }).id;
  adminId = createUser(db, { email: "a@example.test", name: "Ada Admin", role: "admin", passwordHash: "x", allSites: true, siteIds: [] }).id;

  // Two hours of 1 Hz readings: delivery rises 0.01 bar per second from 200 bar.
  const store = createReadingStore(db);
  const rows: ReadingInput[] = [];
  for (let s = 0; s < 7_200; s++) rows.push(reading(c1, NOW - 7_200_000 + s * 1000, 200 + s * 0.01));
  store.insert(rows);

  createTelemetryStateWriter(db).upsertStates([
    {
      compressorId: c1,
      online: true,
      lastSeenAt: NOW - 1_000,
      receivedAt: NOW - 1_000,
      ts: NOW - 1_000,
      seq: 7_199,
      runState: 3,
      motorOn: 1,
      deliveryBar: 271.99,
      stage1Bar: null,
      stage2Bar: null,
      stage3Bar: null,
      stage4Bar: null,
      stage1C: 90,
      stage2C: 120,
      stage3C: 150,
      stage4C: null,
      oilBar: 4,
      purifierC: 20,
      intakeC: 15,
      hourMeterH: 100,
      starts: 10,
      tripCode: null,
      fillRateBarPerMin: 0.6,
      updatedAt: NOW - 900,
    },
  ]);
  createTelemetryStateWriter(db).insertEvents([
    { ts: NOW - 60_000, compressorId: c1, kind: "state", runState: "running", tripCode: null, text: "", receivedAt: NOW - 59_000 },
    { ts: NOW - 30_000, compressorId: c1, kind: "trip", runState: "tripped", tripCode: 110, text: "hot", receivedAt: NOW - 29_000 },
    { ts: NOW - 10_000, compressorId: c2, kind: "comms_lost", runState: null, tripCode: null, text: "", receivedAt: NOW - 10_000 },
  ]);
});

afterAll(() => db.$client.close());

describe("loadBoard", () => {
  it("joins configuration with the last known state, scoped to sites", () => {
    const all = loadBoard(db, null, NOW);
    expect(all.sites.map((s) => s.code)).toEqual(["alpha", "bravo"]);
    const a = all.compressors.find((c) => c.id === c1)!;
    expect(a).toMatchObject({ name: "A-1", stages: 3, ratedPressureBar: 330, stopPressureBar: 300, liveStamp: NOW - 900 });
    expect(a.live).toMatchObject({ online: true, runState: "running", deliveryBar: 271.99, stageC: [90, 120, 150], fillRateBarPerMin: 0.6 });
    expect(all.compressors.find((c) => c.id === c2)!.live).toBeNull();

    const onlyB = loadBoard(db, [siteB], NOW);
    expect(onlyB.sites.map((s) => s.code)).toEqual(["bravo"]);
    expect(onlyB.compressors.map((c) => c.id)).toEqual([c2]);
    expect(loadLiveState(db, c2)).toEqual({ live: null, liveStamp: 0 });
  });
});

describe("readTrend", () => {
  it("aggregates raw readings in SQL for short spans", () => {
    const t = readTrend(db, c1, "deliveryBar", "15m", NOW);
    expect(t.source).toBe("raw");
    expect(t.bucketMs).toBe(1_000);
    expect(t.points.length).toBeGreaterThan(890);
    expect(t.points.length).toBeLessThanOrEqual(1_001);
    const last = t.points.at(-1)!;
    expect(last[1]).toBeCloseTo(271.99, 6);
  });

  it("reads 1-minute rollups for a day, with mean, min and max per bucket", () => {
    const t = readTrend(db, c1, "deliveryBar", "24h", NOW);
    expect(t.source).toBe("1m");
    expect(t.bucketMs).toBe(2 * 60_000);
    // 120 one-minute buckets of data → 60 two-minute buckets
    const withData = t.points.filter((p) => p[1] != null);
    expect(withData).toHaveLength(60);
    const [, mean, min, max] = withData[0]!;
    expect(min).toBeCloseTo(200, 6);
    expect(max).toBeCloseTo(200 + 119 * 0.01, 6);
    expect(mean).toBeCloseTo(200 + 59.5 * 0.01, 6);
    expect(t.to - t.from).toBeGreaterThanOrEqual(trendSpanMs["24h"]);
  });

  it("reads 1-hour rollups for a year, within the point budget", () => {
    const t = readTrend(db, c1, "stage3C", "1y", NOW);
    expect(t.source).toBe("1h");
    expect(t.points.length).toBeLessThanOrEqual(1_001);
    expect(t.points.filter((p) => p[1] != null).every((p) => p[1] === 150)).toBe(true);
  });

  it("returns nothing for a signal without readings", () => {
    expect(readTrend(db, c1, "stage4C", "1h", NOW).points).toEqual([]);
  });
});

describe("listDeviceEvents", () => {
  it("lists one compressor's events newest first", () => {
    const ev = listDeviceEvents(db, c1);
    expect(ev.map((e) => e.kind)).toEqual(["trip", "state"]);
    expect(ev[0]).toMatchObject({ tripCode: 110, runState: "tripped", text: "hot" });
    expect(listDeviceEvents(db, c1, { before: NOW - 30_000 }).map((e) => e.kind)).toEqual(["state"]);
  });
});

describe("display links", () => {
  const actor = () => ({ userId: adminId, email: "a@example.test", ip: "127.0.0.1" });

  it("stores only a hash of the token, resolves it, and refuses it once revoked", () => {
    const { link, token } = createDisplayLink(db, { label: "Control room", siteIds: [siteB] }, actor(), NOW);
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const stored = db.$client.prepare("SELECT token_hash AS h FROM display_links WHERE id = ?").get(link.id) as { h: string };
    expect(stored.h).toBe(hashDisplayToken(token));
    expect(stored.h).not.toContain(token);
    expect(link).toMatchObject({ label: "Control room", siteIds: [siteB], siteNames: ["Bravo"], createdByName: "Ada Admin" });

    // A new wall screen is dark, in bar and °C, until an administrator says otherwise.
    expect(resolveDisplayLink(db, token, NOW + 1)).toEqual({
      status: "ok",
      id: link.id,
      label: "Control room",
      siteIds: [siteB],
      theme: "dark",
      units: { pressureUnit: "bar", temperatureUnit: "C" },
    });
    expect(listDisplayLinks(db).find((l) => l.id === link.id)!.lastUsedAt).toBe(NOW + 1);
    expect(resolveDisplayLink(db, "x".repeat(43))).toEqual({ status: "unknown" });
    expect(resolveDisplayLink(db, "short")).toEqual({ status: "unknown" });

    revokeDisplayLink(db, link.id, actor(), NOW + 2);
    expect(resolveDisplayLink(db, token, NOW + 3)).toEqual({ status: "revoked" });
    const audit = db.$client
      .prepare("SELECT action, details FROM audit_log WHERE target_type = 'display_link' AND target_id = ? ORDER BY id")
      .all(String(link.id)) as { action: string; details: string }[];
    expect(audit.map((a) => a.action)).toEqual(["display_link.create", "display_link.revoke"]);
    expect(audit.map((a) => a.details).join(" ")).not.toContain(token);
  });

  it("keeps the theme and units an administrator chose for the wall screen", () => {
    const { token, link } = createDisplayLink(db, { label: "Night shift", siteIds: [], theme: "light", units: { pressureUnit: "psi", temperatureUnit: "F" } }, actor(), NOW);
    expect(link).toMatchObject({ theme: "light", pressureUnit: "psi", temperatureUnit: "F" });
    expect(resolveDisplayLink(db, token, NOW)).toMatchObject({ theme: "light", units: { pressureUnit: "psi", temperatureUnit: "F" } });
  });

  it("means every site when no site is chosen", () => {
    const { token } = createDisplayLink(db, { label: "Lobby", siteIds: [] }, actor(), NOW);
    expect(resolveDisplayLink(db, token, NOW)).toMatchObject({ status: "ok", siteIds: null });
  });
});
