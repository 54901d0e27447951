import { z } from "zod";
import { airStandards, type AirStandard, type AirTestVerdict } from "./air-standards";
import type { CartridgeLevel, CartridgeStatus } from "./purifier";

/** A sample or change stamped this far ahead of the server clock is refused as "in the future". */
export const FUTURE_SLACK_MS = 5 * 60_000;
const EARLIEST = Date.UTC(2000, 0, 1);

const when = (what: string) =>
  z
    .number({ error: `Enter the ${what}` })
    .int()
    .min(EARLIEST, `The ${what} is before 2000`)
    .refine((t) => t <= Date.now() + FUTURE_SLACK_MS, `The ${what} is in the future`);

const text = (label: string, max: number) => z.string().trim().min(1, `Enter the ${label}`).max(max, `At most ${max} characters`);

/** A measured value: null when not measured; the range catches a value typed in the wrong unit. */
const measured = (min: number, max: number, message: string) =>
  z.number({ error: message }).finite(message).min(min, message).max(max, message).nullable();

export const waterUnits = ["mg/m3", "ppmv", "dewpoint"] as const;
export const waterUnitLabels: Record<(typeof waterUnits)[number], string> = {
  "mg/m3": "mg/m³",
  ppmv: "ppm v/v",
  dewpoint: "°C pressure dew point",
};

export const airTestInputSchema = z
  .object({
    compressorId: z.number().int().positive(),
    sampledAt: when("sample time"),
    samplePoint: text("sample point", 120),
    fillBar: z.number({ error: "Enter the fill pressure in bar" }).finite().min(1, "Fill pressure is in bar gauge, 1–700").max(700, "Fill pressure is in bar gauge, 1–700"),
    laboratory: text("laboratory", 120),
    certificateNo: text("certificate number", 60),
    oxygenPct: measured(10, 30, "Oxygen is in % v/v, 10–30 (air is 20.9; a fraction such as 0.209 is not accepted)"),
    co2Ppm: measured(0, 20_000, "Carbon dioxide is in ppm v/v, 0–20 000 (1 % v/v = 10 000 ppm)"),
    coPpm: measured(0, 1_000, "Carbon monoxide is in ppm v/v, 0–1000"),
    oilMgM3: measured(0, 100, "Oil is in mg/m³, 0–100"),
    waterValue: z.number({ error: "Enter a number" }).finite("Enter a number").nullable(),
    waterUnit: z.enum(waterUnits),
    hydrocarbonsPpm: measured(0, 10_000, "Hydrocarbons are in ppm v/v as methane, 0–10 000"),
    odourOk: z.boolean().nullable(),
    note: z.string().trim().max(500, "At most 500 characters"),
  })
  .superRefine((v, ctx) => {
    if (v.waterValue == null) return;
    const [min, max, msg] =
      v.waterUnit === "mg/m3"
        ? [0, 5_000, "Water in mg/m³ is 0–5000"]
        : v.waterUnit === "ppmv"
          ? [0, 10_000, "Water in ppm v/v is 0–10 000"]
          : [-100, 60, "A pressure dew point is in °C, −100 to 60"];
    if (v.waterValue < min || v.waterValue > max) ctx.addIssue({ code: "custom", path: ["waterValue"], message: msg });
  });
export type AirTestInput = z.infer<typeof airTestInputSchema>;

/** Fields of airTestInputSchema that hold an analyte, by analyte (for messages next to the field). */
export const analyteFields = {
  oxygen: "oxygenPct",
  co2: "co2Ppm",
  co: "coPpm",
  oil: "oilMgM3",
  water: "waterValue",
  hydrocarbons: "hydrocarbonsPpm",
  odour: "odourOk",
} as const;

export const cartridgeChangeInputSchema = z.object({
  compressorId: z.number().int().positive(),
  changedAt: when("change time"),
  hourMeterH: z.number({ error: "Enter the hour meter reading" }).finite().min(0, "Hours are 0 or more").max(1_000_000, "Hours are at most 1 000 000"),
  lot: text("cartridge lot number", 60),
  note: z.string().trim().max(500, "At most 500 characters"),
});
export type CartridgeChangeInput = z.infer<typeof cartridgeChangeInputSchema>;

export const siteAirSettingsInputSchema = z.object({
  siteId: z.number().int().positive(),
  standard: z.enum(airStandards),
  intervalDays: z.number({ error: "Enter the interval in days" }).int("Whole days").min(7, "At least 7 days").max(730, "At most 730 days"),
});
export type SiteAirSettingsInput = z.infer<typeof siteAirSettingsInputSchema>;

export const purifierRatingInputSchema = z.object({
  scopeType: z.enum(["model", "compressor"]),
  scopeId: z.number().int().positive(),
  /** Null removes a compressor's override (the model's rating applies again). */
  rating: z
    .object({
      kind: z.enum(["water-g", "air-m3"]),
      value: z.number({ error: "Enter the capacity" }).finite().positive("Capacity must be above zero").max(1_000_000),
      refBar: z.number({ error: "Enter the reference pressure" }).finite().min(1, "Reference pressure is 1–700 bar").max(700, "Reference pressure is 1–700 bar"),
      refC: z.number({ error: "Enter the reference temperature" }).finite().min(-10, "Reference temperature is −10 to 60 °C").max(60, "Reference temperature is −10 to 60 °C"),
      advisoryPct: z.number().finite().min(50, "Advisory between 50 and 99 %").max(99, "Advisory between 50 and 99 %"),
    })
    .nullable(),
  backPressureBar: z.number().finite().min(0, "Back-pressure valve 0–400 bar").max(400, "Back-pressure valve 0–400 bar").optional(),
});
export type PurifierRatingInput = z.infer<typeof purifierRatingInputSchema>;

export type AirTestDto = {
  id: number;
  compressorId: number;
  compressorName: string;
  siteId: number;
  sampledAt: number;
  samplePoint: string;
  fillBar: number;
  laboratory: string;
  certificateNo: string;
  standard: AirStandard;
  passed: boolean;
  verdict: AirTestVerdict;
  certificate: { id: number; name: string } | null;
  note: string;
  createdBy: string;
  createdAt: number;
};

export type CartridgeChangeDto = {
  id: number;
  compressorId: number;
  changedAt: number;
  hourMeterH: number;
  lot: string;
  note: string;
  photo: { id: number; name: string } | null;
  createdBy: string;
};

export type CartridgeDto = {
  /** Null when neither the model nor the compressor has a cartridge rating. */
  status: CartridgeStatus | null;
  level: CartridgeLevel | null;
  advisoryPct: number;
  sinceTs: number | null;
  lastChange: CartridgeChangeDto | null;
  ratingSource: "model" | "compressor" | null;
  /** Whether the purifier's pressure was reported by the device in the counted period (else it was estimated). */
  backPressureBar: number;
};

export type AirQualityRowDto = {
  compressorId: number;
  compressorName: string;
  inService: boolean;
  siteId: number;
  siteName: string;
  timeZone: string;
  standard: AirStandard;
  intervalDays: number;
  lastTest: { id: number; sampledAt: number; passed: boolean } | null;
  /** Null when no test has ever been recorded: due now. */
  nextDueAt: number | null;
  overdueDays: number;
  cartridge: CartridgeDto;
};
