import { describe, expect, it } from "vitest";
import { judgeAirTest, requiredAnalytes, type AirStandard, type AirTestValues } from "@/shared/air-standards";

// Limits as in shared/air-standards.ts, each recalled from the standard named there (from memory: no licensed copy here).
const clean: AirTestValues = {
  fillBar: 200,
  oxygenPct: 20.9,
  co2Ppm: 400,
  coPpm: 1,
  oilMgM3: 0.1,
  waterValue: 20,
  waterUnit: "ppmv",
  hydrocarbonsPpm: 5,
  odourOk: true,
};

function result(standard: AirStandard, patch: Partial<AirTestValues>, analyte: string) {
  const v = judgeAirTest(standard, { ...clean, ...patch });
  return { passed: v.passed, r: v.analytes.find((a) => a.analyte === analyte)!.result };
}

describe("limits at each standard's boundary", () => {
  it.each([
    // EN 12021:2014: O2 21 ± 1 %, CO2 ≤ 500 ml/m³, CO ≤ 5 ml/m³, oil ≤ 0.5 mg/m³
    ["en12021", "oxygen", { oxygenPct: 20 }, { oxygenPct: 19.9 }],
    ["en12021", "oxygen", { oxygenPct: 22 }, { oxygenPct: 22.1 }],
    ["en12021", "co2", { co2Ppm: 500 }, { co2Ppm: 501 }],
    ["en12021", "co", { coPpm: 5 }, { coPpm: 5.1 }],
    ["en12021", "oil", { oilMgM3: 0.5 }, { oilMgM3: 0.51 }],
    // CGA G-7.1 Grade D: O2 19.5–23.5 %, CO2 ≤ 1000 ppm, CO ≤ 10 ppm, condensed hydrocarbons ≤ 5 mg/m³
    ["cga-d", "oxygen", { oxygenPct: 19.5 }, { oxygenPct: 19.4 }],
    ["cga-d", "oxygen", { oxygenPct: 23.5 }, { oxygenPct: 23.6 }],
    ["cga-d", "co2", { co2Ppm: 1000 }, { co2Ppm: 1001 }],
    ["cga-d", "co", { coPpm: 10 }, { coPpm: 10.1 }],
    ["cga-d", "oil", { oilMgM3: 5 }, { oilMgM3: 5.1 }],
    // CGA G-7.1 Grade E: O2 20–22 %, total hydrocarbons as methane ≤ 25 ppm
    ["cga-e", "oxygen", { oxygenPct: 20 }, { oxygenPct: 19.9 }],
    ["cga-e", "hydrocarbons", { hydrocarbonsPpm: 25 }, { hydrocarbonsPpm: 25.1 }],
    // NFPA 1989: CO ≤ 5 ppm, water ≤ 24 ppm v/v, total hydrocarbons ≤ 25 ppm
    ["nfpa1989", "co", { coPpm: 5 }, { coPpm: 5.1 }],
    ["nfpa1989", "water", { waterValue: 24 }, { waterValue: 24.1 }],
    ["nfpa1989", "hydrocarbons", { hydrocarbonsPpm: 25 }, { hydrocarbonsPpm: 25.1 }],
  ] as const)("%s %s: just inside passes, just outside fails", (standard, analyte, inside, outside) => {
    expect(result(standard, inside, analyte)).toEqual({ passed: true, r: "pass" });
    expect(result(standard, outside, analyte)).toEqual({ passed: false, r: "fail" });
  });

  it("odour noticed fails under every standard; a limited analyte left out fails the record", () => {
    for (const s of ["en12021", "cga-d", "cga-e", "nfpa1989"] as const) {
      expect(result(s, { odourOk: false }, "odour")).toEqual({ passed: false, r: "fail" });
      expect(result(s, { coPpm: null }, "co")).toEqual({ passed: false, r: "missing" });
    }
  });

  it("an analyte a standard does not limit does not count", () => {
    // CGA G-7.1 Grade D sets no water or total-hydrocarbon limit; EN 12021 no hydrocarbon figure
    expect(result("cga-d", { waterValue: 5000, waterUnit: "mg/m3", hydrocarbonsPpm: 900 }, "water")).toEqual({ passed: true, r: "no-limit" });
    expect(result("en12021", { hydrocarbonsPpm: 900, waterUnit: "mg/m3", waterValue: 10 }, "hydrocarbons")).toEqual({ passed: true, r: "no-limit" });
  });
});

describe("EN 12021 water limit depends on the fill pressure", () => {
  it("50 mg/m³ from 40 to 200 bar, 35 mg/m³ above 200 bar (EN 12021:2014 Table 2, from memory)", () => {
    const at = (fillBar: number, mg: number) => result("en12021", { fillBar, waterValue: mg, waterUnit: "mg/m3" }, "water");
    expect(at(200, 50)).toEqual({ passed: true, r: "pass" });
    expect(at(200, 50.1)).toEqual({ passed: false, r: "fail" });
    expect(at(300, 35)).toEqual({ passed: true, r: "pass" });
    expect(at(300, 36)).toEqual({ passed: false, r: "fail" });
    expect(at(201, 40)).toEqual({ passed: false, r: "fail" });
    expect(at(40, 50)).toEqual({ passed: true, r: "pass" });
  });

  it("converts ppm v/v and pressure dew point into mg/m³ before judging", () => {
    // 60 ppm v/v × 0.749 mg/m³ per ppm = 44.9 mg/m³: within 50 at 200 bar, beyond 35 at 300 bar
    expect(result("en12021", { fillBar: 200, waterValue: 60, waterUnit: "ppmv" }, "water").r).toBe("pass");
    expect(result("en12021", { fillBar: 300, waterValue: 60, waterUnit: "ppmv" }, "water").r).toBe("fail");
    const v = judgeAirTest("en12021", { ...clean, fillBar: 300, waterValue: 60, waterUnit: "ppmv" });
    expect(v.analytes.find((a) => a.analyte === "water")!.converted!.value).toBeCloseTo(44.9, 1);
  });

  it("below 40 bar EN 12021 sets no figure, so water is not required", () => {
    expect(requiredAnalytes("en12021", 30)).not.toContain("water");
    expect(requiredAnalytes("en12021", 200)).toContain("water");
    expect(requiredAnalytes("nfpa1989", 30)).toContain("water");
  });
});
