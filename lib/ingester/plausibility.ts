import type { ReadingInput } from "@/shared/telemetry";

/**
 * A pressure above this multiple of the model's rated pressure cannot be real. The final stage's safety valve keeps
 * a momentary surge within 10 % of the maximum allowable pressure (Pressure Equipment Directive 2014/68/EU, Annex I
 * 7.3; from memory); the other 10 % allows for the transmitter's error and a rating quoted below the valve's set
 * point (common practice). Above it the sensor or its scaling is at fault.
 */
export const PLAUSIBLE_OVER_RATED = 1.2;

export const pressureFields = ["deliveryBar", "stage1Bar", "stage2Bar", "stage3Bar", "stage4Bar"] as const;
export type PressureField = (typeof pressureFields)[number];

export function plausibleCeilingBar(ratedPressureBar: number): number {
  return ratedPressureBar * PLAUSIBLE_OVER_RATED;
}

/**
 * Takes out of a reading every pressure its model cannot reach: the field becomes null and the reported value goes to
 * `implausible`, so the rest of the reading is kept and the value stays on record. Returns the fields taken out.
 */
export function withholdImplausible(r: ReadingInput, ratedPressureBar: number): PressureField[] {
  const ceiling = plausibleCeilingBar(ratedPressureBar);
  let out: PressureField[] | null = null;
  for (const f of pressureFields) {
    const v = r[f];
    if (v === null || v <= ceiling) continue;
    (out ??= []).push(f);
    (r.implausible ??= {})[f] = v;
    r[f] = null;
  }
  return out ?? [];
}
