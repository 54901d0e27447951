import { describe, expect, it } from "vitest";
import { z } from "zod";
import { airTestInputSchema, cartridgeChangeInputSchema } from "@/shared/air-quality-schema";

const ok = {
  compressorId: 1,
  sampledAt: Date.now() - 60_000,
  samplePoint: "Whip 1",
  fillBar: 300,
  laboratory: "Lab",
  certificateNo: "C-1",
  oxygenPct: 20.9,
  co2Ppm: 400,
  coPpm: 1,
  oilMgM3: 0.1,
  waterValue: 20,
  waterUnit: "mg/m3",
  hydrocarbonsPpm: null,
  odourOk: true,
  note: "",
};

const errorsOf = (input: unknown) => {
  const r = airTestInputSchema.safeParse(input);
  return r.success ? {} : z.flattenError(r.error).fieldErrors;
};

describe("air-test input: a clear message next to the field", () => {
  it("accepts a plausible record", () => {
    expect(errorsOf(ok)).toEqual({});
  });
  it("refuses a value typed in the wrong unit", () => {
    expect(errorsOf({ ...ok, oxygenPct: 0.209 }).oxygenPct?.[0]).toMatch(/fraction such as 0.209 is not accepted/);
    expect(errorsOf({ ...ok, co2Ppm: 50_000 }).co2Ppm?.[0]).toMatch(/1 % v\/v = 10 000 ppm/);
    expect(errorsOf({ ...ok, waterUnit: "dewpoint", waterValue: 150 }).waterValue?.[0]).toMatch(/pressure dew point is in °C/);
    expect(errorsOf({ ...ok, waterUnit: "dewpoint", waterValue: -50 })).toEqual({});
  });
  it("refuses a sample time in the future", () => {
    expect(errorsOf({ ...ok, sampledAt: Date.now() + 3_600_000 }).sampledAt?.[0]).toBe("The sample time is in the future");
    const c = cartridgeChangeInputSchema.safeParse({ compressorId: 1, changedAt: Date.now() + 86_400_000, hourMeterH: 10, lot: "L", note: "" });
    expect(c.success).toBe(false);
  });
});
