import { describe, expect, it } from "vitest";
import { addBucket, capacityGrams, cartridgeLevel, cartridgeStatus, emptyUsage, purifierPressureBar, type PurifierSpec } from "@/shared/purifier";
import { enhancementFactor } from "@/shared/water";

const spec: PurifierSpec = { ratedDeliveryLpm: 300, backPressureBar: 150, rating: { kind: "water-g", value: 500, refBar: 200, refC: 20 } };

/** Hand-worked water per m³ of free air: x = f·es/P, grams = x/(1−x) × n₀ × M_w, n₀ = 101325/(8.314463 × 293.15) = 41.574 mol/m³. */
function handWater(esPa: number, bar: number, tC: number): number {
  const P = bar * 1e5 + 101_325;
  const x = (enhancementFactor(P, tC) * esPa) / P; // f is the named parameter of shared/water.ts
  return (x / (1 - x)) * 41.574 * 18.015;
}

describe("cartridge water load", () => {
  it("a constructed duty: 10 h at 25 °C and 200 bar, rated 300 l/min", () => {
    const u = emptyUsage();
    for (let h = 0; h < 10; h++) addBucket(u, spec, { runS: 3600, purifierC: 25, purifierBar: 200, deliveryBar: 180 });
    // free air = 0.300 m³/min × 600 min = 180 m³; IAPWS-95: es(25 °C) = 3169.9 Pa
    expect(u.freeAirM3).toBeCloseTo(180, 9);
    expect(u.runS).toBe(36_000);
    expect(u.waterG).toBeCloseTo(180 * handWater(3169.9, 200, 25), 1);
    // ≈ 180 m³ × 0.205 g/m³ ≈ 37 g
    expect(u.waterG).toBeGreaterThan(35);
    expect(u.waterG).toBeLessThan(39);
  });

  it("the ratio between two purifier temperatures follows the saturation pressure", () => {
    const at = (tC: number) => {
      const u = emptyUsage();
      addBucket(u, spec, { runS: 3600, purifierC: tC, purifierBar: 200, deliveryBar: null });
      return u.waterG;
    };
    // IAPWS-95: es(35 °C) = 5629.1 Pa, es(15 °C) = 1705.8 Pa → 3.30 ×, less the small drop of f with temperature
    const ratio = at(35) / at(15);
    expect(ratio).toBeCloseTo(handWater(5629.1, 200, 35) / handWater(1705.8, 200, 15), 2);
    expect(ratio).toBeGreaterThan(3.1);
    expect(ratio).toBeLessThan(3.3);
  });

  it("without a reported purifier pressure uses max(delivery, back-pressure valve)", () => {
    expect(purifierPressureBar(spec, { purifierBar: null, deliveryBar: 180 })).toBe(180);
    expect(purifierPressureBar(spec, { purifierBar: null, deliveryBar: 90 })).toBe(150);
    expect(purifierPressureBar(spec, { purifierBar: 210, deliveryBar: 90 })).toBe(210);
    // lower pressure carries more water per m³ of free air: 150 bar vs 200 bar ≈ P ratio 201/151 (f lowers it a little)
    const u150 = emptyUsage();
    const u200 = emptyUsage();
    addBucket(u150, spec, { runS: 3600, purifierC: 20, purifierBar: null, deliveryBar: 100 });
    addBucket(u200, spec, { runS: 3600, purifierC: 20, purifierBar: 200, deliveryBar: 100 });
    expect(u150.waterG / u200.waterG).toBeCloseTo(handWater(2339.2, 150, 20) / handWater(2339.2, 200, 20), 3);
  });

  it("capacity given as free air at a reference condition converts to grams", () => {
    const g = capacityGrams({ kind: "air-m3", value: 1000, refBar: 200, refC: 20 });
    // IAPWS-95: es(20 °C) = 2339.2 Pa
    expect(g).toBeCloseTo(1000 * handWater(2339.2, 200, 20), 0);
  });

  it("status: percent used, hours and date to 100 %, and the count by hours alone", () => {
    const hot = { ...spec, rating: { kind: "water-g" as const, value: 200, refBar: 200, refC: 20 } };
    const used = emptyUsage();
    for (let h = 0; h < 20; h++) addBucket(used, hot, { runS: 3600, purifierC: 35, purifierBar: 200, deliveryBar: null });
    const now = Date.UTC(2026, 6, 1);
    // recent duty: the same 20 running hours over 10 days → 2 h/day
    const s = cartridgeStatus(hot, used, used, 10 * 86_400_000, now);
    expect(s.usedPct).toBeCloseTo((100 * used.waterG) / 200, 9);
    const gPerH = used.waterG / 20;
    expect(s.hoursToFull!).toBeCloseTo((200 - used.waterG) / gPerH, 6);
    expect(s.fullAt!).toBeCloseTo(now + (s.hoursToFull! / 2) * 86_400_000, -1);
    // by hours alone (rated at 20 °C) the cartridge looks far fresher: the ratio is the water ratio 35 °C / 20 °C
    expect(s.usedPct / s.hoursOnly.usedPct).toBeCloseTo(handWater(5629.1, 200, 35) / handWater(2339.2, 200, 20), 2);
    expect(cartridgeLevel(79.9, 80)).toBe("ok");
    expect(cartridgeLevel(80, 80)).toBe("advisory");
    expect(cartridgeLevel(100, 80)).toBe("warning");
  });
});
