import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import {
  barGaugeToPaAbs,
  dewPointFromPpmv,
  enhancementFactor,
  mgPerM3ToPpmv,
  ppmvFromDewPoint,
  ppmvToMgPerM3,
  saturationPressure,
  saturationPressureWater,
  sublimationPressureIce,
  waterPerFreeAirM3,
  waterToPpmv,
} from "@/shared/water";

const require = createRequire(import.meta.url);
const psychrolib = require("psychrolib") as { SI: number; SetUnitSystem(u: number): void; GetSatVapPres(t: number): number };
psychrolib.SetUnitSystem(psychrolib.SI);

const fToC = (f: number) => (f - 32) / 1.8;

describe("saturation vapour pressure (IAPWS)", () => {
  it("matches IAPWS published values over liquid water", () => {
    // IAPWS-95 (Wagner & Pruß 2002): triple point 273.16 K → 611.655 Pa (R14-08 gives 611.657 Pa)
    expect(saturationPressureWater(0.01)).toBeCloseTo(611.656, 0);
    // IAPWS-95: es(20 °C) = 2339.2 Pa
    expect(saturationPressureWater(20)).toBeCloseTo(2339.2, 0);
    // IAPWS-IF97 region 4 verification table: T = 300 K → ps = 0.353658941e-2 MPa
    expect(saturationPressureWater(300 - 273.15) / 3536.58941).toBeCloseTo(1, 4);
    // IAPWS-IF97 region 4 verification table: T = 500 K → 0.263889776e1 MPa
    // (IF97 and the IAPWS-95 auxiliary equation differ by ~1e-4 here; Wagner & Pruß state the equation to 0.025 %)
    expect(saturationPressureWater(500 - 273.15) / 2.63889776e6).toBeCloseTo(1, 3);
    // IAPWS-95: normal boiling point 373.124 K at 101 325 Pa
    expect(saturationPressureWater(373.124 - 273.15)).toBeCloseTo(101_325, -1);
  });

  it("matches the IAPWS R14-08 sublimation pressure of ice", () => {
    // IAPWS R14-08(2011), table of check values: 230 K → 8.947 352 740 189 Pa; 273.16 K → 611.657 Pa
    expect(sublimationPressureIce(230 - 273.15)).toBeCloseTo(8.94735274, 5);
    expect(sublimationPressureIce(0.01)).toBeCloseTo(611.657, 2);
    expect(saturationPressure(-20)).toBe(sublimationPressureIce(-20));
  });

  it.each([-40, -20, -5, 5, 10, 20, 30, 40, 60, 80])("agrees with psychrolib 1.1.1 (Hyland–Wexler) at %d °C", (t) => {
    // psychrolib 1.1.1 GetSatVapPres: ASHRAE Handbook Fundamentals 2017 ch. 1 eq. 5–6 (Hyland & Wexler 1983), over ice below 0 °C
    const ref = psychrolib.GetSatVapPres(t);
    expect(Math.abs(saturationPressure(t) / ref - 1)).toBeLessThan(0.003);
  });
});

describe("water content conversions", () => {
  it("mg/m³ ↔ ppm v/v at 20 °C and 1013.25 mbar", () => {
    // ideal gas: 1 ppm v/v × 101325 Pa / (8.314 J/(mol·K) × 293.15 K) × 18.015 g/mol = 0.749 mg/m³ (ISO 8573-1 tables use the same 20 °C reference, from memory)
    expect(ppmvToMgPerM3(1)).toBeCloseTo(0.749, 3);
    expect(mgPerM3ToPpmv(ppmvToMgPerM3(123.4))).toBeCloseTo(123.4, 9);
  });

  it("ppm v/v ↔ atmospheric dew point against the NFPA 1989 / CGA G-7.1 table", () => {
    // NFPA 1989 and CGA G-7.1: 24 ppm v/v water ≙ dew point −65 °F (−53.9 °C) at 1 atm
    expect(dewPointFromPpmv(24)).toBeCloseTo(fToC(-65), 0);
    // NFPA 1989 / CGA G-7.1 grade table, the other way round: −65 °F ≙ 24 ppm v/v
    expect(ppmvFromDewPoint(fToC(-65))).toBeCloseTo(24, 0);
    expect(dewPointFromPpmv(ppmvFromDewPoint(-30))).toBeCloseTo(-30, 6);
  });

  it("pressure dew point uses the enhancement factor and absolute pressure", () => {
    const p = barGaugeToPaAbs(200);
    // enhancement at 1 atm near room temperature is ≈ 1.004 (Greenspan 1976, from memory); the virial estimate gives ≈ 1.003
    expect(enhancementFactor(101_325, 20)).toBeGreaterThan(1.001);
    expect(enhancementFactor(101_325, 20)).toBeLessThan(1.006);
    const ppm = waterToPpmv(5, "dewpoint", 200);
    // hand-worked: x = f·es(5 °C)/P = f × 872.6 Pa / 20 101 325 Pa = f × 43.4 ppm, f(200 bar) ≈ 1.7
    expect(ppm / (saturationPressureWater(5) / p) / 1e6).toBeCloseTo(enhancementFactor(p, 5), 6);
    expect(ppm).toBeGreaterThan(70);
    expect(ppm).toBeLessThan(78);
  });

  it("water carried by free air saturated at the separator", () => {
    // hand-worked: 200 bar g, 20 °C: x = 1.72 × 2339 Pa / 20.1 MPa = 200 ppm → 200 × 0.749 = 150 mg/m³ of free air
    expect(waterPerFreeAirM3(barGaugeToPaAbs(200), 20)).toBeCloseTo(0.15, 2);
    // a hotter purifier carries more: es(30)/es(20) = 4246.8/2339.2 = 1.815 (IAPWS-95), less a little from f
    const ratio = waterPerFreeAirM3(barGaugeToPaAbs(200), 30) / waterPerFreeAirM3(barGaugeToPaAbs(200), 20);
    expect(ratio).toBeGreaterThan(1.75);
    expect(ratio).toBeLessThan(1.82);
  });
});
