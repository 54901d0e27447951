import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { cartridgeUsage, airUnit, effectiveRatings, saveRating, saveSiteAirSettings, specFor } from "@/db/air-quality";
import { createReadingStore } from "@/db/readings";
import { AirQualityRefusal, recordAirTest, recordCartridgeChange, airQualityOverview, runAirQualityWatch } from "@/lib/air-quality/service";
import type { AirTestInput } from "@/shared/air-quality-schema";
import { addBucket, emptyUsage, HOUR_MS } from "@/shared/purifier";
import { makeTempDb, reading, seedFleet, T0, type Fleet, type TempDb } from "./alarms-fixtures";

let t: TempDb;
let fleet: Fleet;
const tech = { id: 1, name: "Tess Technician" };

const passing = (compressorId: number, sampledAt: number): AirTestInput => ({
  compressorId,
  sampledAt,
  samplePoint: "Fill panel whip 1",
  fillBar: 300,
  laboratory: "Invented Gas Lab",
  certificateNo: "C-1",
  oxygenPct: 20.9,
  co2Ppm: 380,
  coPpm: 1,
  oilMgM3: 0.05,
  waterValue: 20,
  waterUnit: "mg/m3",
  hydrocarbonsPpm: null,
  odourOk: true,
  note: "",
});

function openAlarms(compressorId: number) {
  return t.db.$client
    .prepare("SELECT key, priority, state, active FROM alarms WHERE compressor_id = ? AND state <> 'normal' ORDER BY key")
    .all(compressorId) as { key: string; priority: string; state: string; active: number }[];
}

beforeEach(() => {
  t = makeTempDb("airkeep-aq-");
  fleet = seedFleet(t.db);
});
afterEach(() => t.cleanup());

describe("air-test records", () => {
  it("a failed test raises a critical alarm and a passing retest clears it", () => {
    const now = T0 + 10 * 86_400_000;
    const bad = recordAirTest(t.db, { ...passing(fleet.c1, now - 3_600_000), coPpm: 7, certificateNo: "C-BAD" }, tech, null, { now });
    expect(bad.passed).toBe(false);
    expect(bad.verdict.analytes.find((a) => a.analyte === "co")!.result).toBe("fail");
    expect(openAlarms(fleet.c1)).toEqual([{ key: "cond:air-quality:air-test-failed", priority: "critical", state: "active-unacknowledged", active: 1 }]);
    const ev = t.db.$client.prepare("SELECT text FROM events WHERE action = 'alarm.raise' AND priority = 'critical'").get() as { text: string };
    expect(ev.text).toMatch(/Do not use air from this compressor until it has been retested/);

    const good = recordAirTest(t.db, { ...passing(fleet.c1, now - 60_000), certificateNo: "C-GOOD" }, tech, null, { now });
    expect(good.passed).toBe(true);
    expect(openAlarms(fleet.c1).every((a) => a.active === 0)).toBe(true);
  });

  it("refuses a record missing a limited analyte, and a compressor outside the caller's sites, storing nothing", () => {
    const now = T0;
    expect(() => recordAirTest(t.db, { ...passing(fleet.c1, now), coPpm: null }, tech, null, { now })).toThrow(AirQualityRefusal);
    try {
      recordAirTest(t.db, { ...passing(fleet.c1, now), coPpm: null }, tech, null, { now });
    } catch (e) {
      expect((e as AirQualityRefusal).fieldErrors).toHaveProperty("coPpm");
    }
    expect(() => recordAirTest(t.db, passing(fleet.c2, now), tech, [fleet.siteA], { now })).toThrow(/No such compressor/);
    expect(() =>
      recordAirTest(t.db, passing(fleet.c1, now), tech, null, {
        now,
        attach: () => {
          throw new Error("disk full");
        },
      }),
    ).toThrow("disk full");
    expect((t.db.$client.prepare("SELECT count(*) AS n FROM air_tests").get() as { n: number }).n).toBe(0);
    expect((t.db.$client.prepare("SELECT count(*) AS n FROM events WHERE kind = 'air-test'").get() as { n: number }).n).toBe(0);
  });

  it("lists compressors by next due, overdue first, and raises the overdue warning", () => {
    saveSiteAirSettings(t.db, { siteId: fleet.siteA, standard: "en12021", intervalDays: 30 }, 1);
    const now = T0 + 100 * 86_400_000;
    recordAirTest(t.db, passing(fleet.c1, now - 40 * 86_400_000), tech, null, { now });
    recordAirTest(t.db, passing(fleet.c2, now - 5 * 86_400_000), tech, null, { now });
    const rows = airQualityOverview(t.db, null, now);
    expect(rows.map((r) => r.compressorId)).toEqual([fleet.c1, fleet.c2]);
    expect(rows[0]!.overdueDays).toBe(10);
    expect(rows[1]!.overdueDays).toBe(0);
    runAirQualityWatch(t.db, now);
    expect(openAlarms(fleet.c1)).toEqual([{ key: "cond:air-quality:air-test-overdue", priority: "warning", state: "active-unacknowledged", active: 1 }]);
    expect(openAlarms(fleet.c2)).toEqual([]);
  });
});

describe("cartridge use from the rollups", () => {
  it("sums incrementally to the same figure as at once, warns at 100 % and resets at a change", () => {
    const store = createReadingStore(t.db);
    // 6 hours running at 200 bar reported purifier pressure and 30 °C, a reading every 30 s
    const rows = [];
    for (let s = 0; s < 6 * 3600; s += 30) rows.push({ ...reading(fleet.c1, s), purifierC: 30, purifierBar: 200 });
    store.insert(rows);
    saveRating(t.db, { scopeType: "model", scopeId: fleet.modelId, rating: { kind: "water-g", value: 30, refBar: 200, refC: 20, advisoryPct: 80 } }, 1);
    const unit = airUnit(t.db, fleet.c1)!;
    const spec = specFor(unit, effectiveRatings(t.db)(unit)!);
    const at3h = cartridgeUsage(t.db, unit, spec, T0 + 3 * HOUR_MS + 1).usage;
    const at6h = cartridgeUsage(t.db, unit, spec, T0 + 7 * HOUR_MS).usage;
    // hand check: 250 l/min rated × 6 h = 90 m³ free air (rated delivery × running time), each hour's water from shared/purifier
    const expected = emptyUsage();
    for (let h = 0; h < 6; h++) addBucket(expected, spec, { runS: h === 5 ? 3570 : 3600, purifierC: 30, purifierBar: 200, deliveryBar: null });
    expect(at6h.freeAirM3).toBeCloseTo(expected.freeAirM3, 6);
    expect(at6h.waterG).toBeCloseTo(expected.waterG, 6);
    expect(at3h.waterG).toBeLessThan(at6h.waterG);
    const stored = t.db.$client.prepare("SELECT through_ts FROM purifier_usage WHERE compressor_id = ?").get(fleet.c1) as { through_ts: number };
    expect(stored.through_ts).toBe(T0 + 7 * HOUR_MS);

    // ≈ 90 m³ × 0.27 g/m³ = 24 g of a 30 g cartridge: past the 80 % advisory
    const now = T0 + 7 * HOUR_MS;
    runAirQualityWatch(t.db, now);
    expect(openAlarms(fleet.c1).map((a) => a.key)).toContain("cond:air-quality:cartridge-advisory");
    recordCartridgeChange(t.db, { compressorId: fleet.c1, changedAt: now, hourMeterH: 1234, lot: "L-77", note: "" }, tech, null, { now });
    expect(openAlarms(fleet.c1).filter((a) => a.active === 1).map((a) => a.key)).not.toContain("cond:air-quality:cartridge-advisory");
    expect(cartridgeUsage(t.db, unit, spec, now + 1).usage.waterG).toBe(0);
  });
});
