import { z } from "zod";

export const pressureUnits = ["bar", "psi", "MPa"] as const;
export const temperatureUnits = ["C", "F"] as const;
export const pressureUnitSchema = z.enum(pressureUnits);
export const temperatureUnitSchema = z.enum(temperatureUnits);
export type PressureUnit = z.infer<typeof pressureUnitSchema>;
export type TemperatureUnit = z.infer<typeof temperatureUnitSchema>;

export const unitPreferenceSchema = z.object({
  pressureUnit: pressureUnitSchema,
  temperatureUnit: temperatureUnitSchema,
});
export type UnitPreference = z.infer<typeof unitPreferenceSchema>;
export const defaultUnits: UnitPreference = { pressureUnit: "bar", temperatureUnit: "C" };

// Factors from NIST SP 811 (2008), appendix B.8: 1 bar = 1.0E+05 Pa, 1 psi = 6.894 757 E+03 Pa.
const pascalsPer: Record<PressureUnit, number> = {
  bar: 1e5,
  psi: 6.894757293168361e3,
  MPa: 1e6,
};

/** Pressures are stored in bar (gauge); this converts for display. */
export function pressureFromBar(bar: number, unit: PressureUnit): number {
  return (bar * pascalsPer.bar) / pascalsPer[unit];
}

export function pressureToBar(value: number, unit: PressureUnit): number {
  return (value * pascalsPer[unit]) / pascalsPer.bar;
}

/** Temperatures are stored in °C. */
export function temperatureFromC(c: number, unit: TemperatureUnit): number {
  return unit === "C" ? c : c * 1.8 + 32;
}

export function temperatureToC(value: number, unit: TemperatureUnit): number {
  return unit === "C" ? value : (value - 32) / 1.8;
}

/** A temperature difference (deadband, span) converts without the offset. */
export function temperatureDeltaFromC(delta: number, unit: TemperatureUnit): number {
  return unit === "C" ? delta : delta * 1.8;
}

export const pressureDecimals: Record<PressureUnit, number> = { bar: 1, psi: 0, MPa: 2 };

export function pressureLabel(unit: PressureUnit): string {
  return unit;
}

export function temperatureLabel(unit: TemperatureUnit): string {
  return unit === "C" ? "°C" : "°F";
}

export function formatPressure(bar: number | null | undefined, unit: PressureUnit): string {
  if (bar == null || !Number.isFinite(bar)) return "—";
  return `${pressureFromBar(bar, unit).toFixed(pressureDecimals[unit])} ${pressureLabel(unit)}`;
}

export function formatTemperature(c: number | null | undefined, unit: TemperatureUnit): string {
  if (c == null || !Number.isFinite(c)) return "—";
  return `${temperatureFromC(c, unit).toFixed(0)} ${temperatureLabel(unit)}`;
}
