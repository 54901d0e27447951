import { describe, expect, it } from "vitest";
import {
  formatPressure,
  formatTemperature,
  pressureFromBar,
  pressureToBar,
  temperatureDeltaFromC,
  temperatureFromC,
  temperatureToC,
} from "@/shared/units";

describe("unit conversions", () => {
  it("converts pressure with the NIST SP 811 factors", () => {
    // NIST SP 811, B.8: 1 psi = 6.894 757 E+03 Pa, 1 bar = 1.0 E+05 Pa → 1 bar = 14.503 77 psi
    expect(pressureFromBar(1, "psi")).toBeCloseTo(14.50377, 4);
    // NIST SP 811, B.8: 1 bar = 0.1 MPa
    expect(pressureFromBar(300, "MPa")).toBeCloseTo(30, 10);
    // 3000 psi × 6894.757 Pa = 20.684 271 MPa = 206.842 71 bar (NIST SP 811 factor)
    expect(pressureToBar(3000, "psi")).toBeCloseTo(206.84271, 4);
    expect(pressureToBar(pressureFromBar(232, "psi"), "psi")).toBeCloseTo(232, 10);
  });

  it("converts temperature per NIST SP 811 (t/°F = 1.8 t/°C + 32)", () => {
    // NIST SP 811, B.9: water's normal boiling point 100 °C = 212 °F; −40 °C = −40 °F
    expect(temperatureFromC(100, "F")).toBeCloseTo(212, 10);
    expect(temperatureFromC(-40, "F")).toBeCloseTo(-40, 10);
    expect(temperatureToC(32, "F")).toBeCloseTo(0, 10);
    // a difference of 1 K = 1.8 °F (NIST SP 811, 4.2.1.1)
    expect(temperatureDeltaFromC(5, "F")).toBeCloseTo(9, 10);
  });

  it("formats with the unit and shows a dash for no value", () => {
    expect(formatPressure(300, "bar")).toBe("300.0 bar");
    expect(formatPressure(300, "psi")).toBe("4351 psi");
    expect(formatPressure(null, "bar")).toBe("—");
    expect(formatPressure(Number.NaN, "MPa")).toBe("—");
    expect(formatTemperature(150, "F")).toBe("302 °F");
  });
});
