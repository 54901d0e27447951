/**
 * Breathing-air quality limits: the one table, each limit with its source beside it. Values are as remembered from the
 * standards' texts (we hold no licensed copy here): check them against your own copy before relying on a verdict.
 */
import { mgPerM3ToPpmv, waterToPpmv, type WaterUnit } from "./water";

export const airStandards = ["en12021", "cga-d", "cga-e", "nfpa1989"] as const;
export type AirStandard = (typeof airStandards)[number];

export const airStandardLabels: Record<AirStandard, string> = {
  en12021: "EN 12021:2014",
  "cga-d": "CGA G-7.1 Grade D",
  "cga-e": "CGA G-7.1 Grade E",
  nfpa1989: "NFPA 1989",
};

export const analytes = ["oxygen", "co2", "co", "oil", "water", "hydrocarbons", "odour"] as const;
export type Analyte = (typeof analytes)[number];

export const analyteLabels: Record<Analyte, string> = {
  oxygen: "Oxygen",
  co2: "Carbon dioxide",
  co: "Carbon monoxide",
  oil: "Oil (mist and vapour)",
  water: "Water",
  hydrocarbons: "Hydrocarbons (as methane)",
  odour: "Odour and taste",
};

/** Unit each numeric limit is stated in (water may be entered in any WaterUnit and is converted). */
export const analyteUnits: Record<Exclude<Analyte, "odour">, string> = {
  oxygen: "% v/v",
  co2: "ppm v/v",
  co: "ppm v/v",
  oil: "mg/m³",
  water: "mg/m³ or ppm v/v",
  hydrocarbons: "ppm v/v",
};

type Range = { min?: number; max?: number; unit: string; source: string };
/** Water limit for a fill pressure (bar gauge); null when the standard sets none for that pressure. */
type WaterLimit = (fillBar: number) => (Range & { unit: "mg/m³" | "ppm v/v" }) | null;

export type StandardLimits = {
  oxygen: Range;
  co2: Range;
  co: Range;
  oil: Range;
  hydrocarbons: Range | null;
  water: WaterLimit;
  odour: { source: string };
};

/** Below this fill pressure EN 12021 ties the water limit to the lowest temperature of use instead of a figure. */
export const EN12021_MIN_FILL_BAR = 40;

export const airQualityLimits: Record<AirStandard, StandardLimits> = {
  en12021: {
    oxygen: { min: 20, max: 22, unit: "% v/v", source: "EN 12021:2014 §5.5.2: 21 ± 1 % (from memory)" },
    co2: { max: 500, unit: "ppm v/v", source: "EN 12021:2014 §5.5.2: ≤ 500 ml/m³ (from memory)" },
    co: { max: 5, unit: "ppm v/v", source: "EN 12021:2014 §5.5.2: ≤ 5 ml/m³ (from memory)" },
    oil: { max: 0.5, unit: "mg/m³", source: "EN 12021:2014 §5.5.2: oil ≤ 0.5 mg/m³ (from memory)" },
    hydrocarbons: null,
    water: (fillBar) =>
      fillBar < EN12021_MIN_FILL_BAR
        ? null
        : fillBar > 200
          ? { max: 35, unit: "mg/m³", source: "EN 12021:2014 Table 2: above 200 bar ≤ 35 mg/m³ (from memory)" }
          : { max: 50, unit: "mg/m³", source: "EN 12021:2014 Table 2: 40–200 bar ≤ 50 mg/m³ (from memory)" },
    odour: { source: "EN 12021:2014 §5.5.2: no significant odour or taste (from memory)" },
  },
  "cga-d": {
    oxygen: { min: 19.5, max: 23.5, unit: "% v/v", source: "CGA G-7.1 Table 1, Grade D: 19.5–23.5 % (from memory)" },
    co2: { max: 1000, unit: "ppm v/v", source: "CGA G-7.1 Grade D: ≤ 1000 ppm (from memory)" },
    co: { max: 10, unit: "ppm v/v", source: "CGA G-7.1 Grade D: ≤ 10 ppm (from memory)" },
    oil: { max: 5, unit: "mg/m³", source: "CGA G-7.1 Grade D: condensed hydrocarbons ≤ 5 mg/m³ (from memory)" },
    hydrocarbons: null,
    water: () => null,
    odour: { source: "CGA G-7.1 Grade D: no pronounced odour (from memory)" },
  },
  "cga-e": {
    oxygen: { min: 20, max: 22, unit: "% v/v", source: "CGA G-7.1 Table 1, Grade E: 20–22 % (from memory)" },
    co2: { max: 1000, unit: "ppm v/v", source: "CGA G-7.1 Grade E: ≤ 1000 ppm (from memory)" },
    co: { max: 10, unit: "ppm v/v", source: "CGA G-7.1 Grade E: ≤ 10 ppm (from memory)" },
    oil: { max: 5, unit: "mg/m³", source: "CGA G-7.1 Grade E: condensed hydrocarbons ≤ 5 mg/m³ (from memory)" },
    hydrocarbons: { max: 25, unit: "ppm v/v", source: "CGA G-7.1 Grade E: total hydrocarbons as methane ≤ 25 ppm (from memory)" },
    water: () => null,
    odour: { source: "CGA G-7.1 Grade E: no pronounced odour (from memory)" },
  },
  nfpa1989: {
    oxygen: { min: 19.5, max: 23.5, unit: "% v/v", source: "NFPA 1989 Table 4.2.1: 19.5–23.5 % (from memory)" },
    co2: { max: 1000, unit: "ppm v/v", source: "NFPA 1989 Table 4.2.1: ≤ 1000 ppm (from memory)" },
    co: { max: 5, unit: "ppm v/v", source: "NFPA 1989 Table 4.2.1: ≤ 5 ppm (from memory)" },
    oil: { max: 5, unit: "mg/m³", source: "NFPA 1989 Table 4.2.1: condensed hydrocarbons ≤ 5 mg/m³ (from memory)" },
    hydrocarbons: { max: 25, unit: "ppm v/v", source: "NFPA 1989 Table 4.2.1: total hydrocarbons as methane ≤ 25 ppm (from memory)" },
    water: () => ({ max: 24, unit: "ppm v/v", source: "NFPA 1989 Table 4.2.1: water ≤ 24 ppm v/v (dew point −65 °F) (from memory)" }),
    odour: { source: "NFPA 1989: no pronounced odour (from memory)" },
  },
};

export type AirTestValues = {
  fillBar: number;
  oxygenPct: number | null;
  co2Ppm: number | null;
  coPpm: number | null;
  oilMgM3: number | null;
  waterValue: number | null;
  waterUnit: WaterUnit;
  hydrocarbonsPpm: number | null;
  /** True: no significant odour or taste; false: noticed; null: not assessed. */
  odourOk: boolean | null;
};

export type AnalyteVerdict = {
  analyte: Analyte;
  /** Measured value as entered, and its unit. */
  value: number | boolean | null;
  unit: string;
  /** "≤ 5 ppm v/v", "20–22 % v/v", "none set". */
  limitText: string;
  source: string | null;
  /** pass / fail; "no-limit" when this standard sets none (it does not count); "missing" when limited but not measured. */
  result: "pass" | "fail" | "no-limit" | "missing";
  /** Water: the measured value in the limit's unit, when it had to be converted. */
  converted?: { value: number; unit: string };
};

export type AirTestVerdict = { standard: AirStandard; passed: boolean; analytes: AnalyteVerdict[] };

const fmt = (x: number) => String(Number(x.toPrecision(4)));

function rangeText(r: Range): string {
  if (r.min != null && r.max != null) return `${fmt(r.min)}–${fmt(r.max)} ${r.unit}`;
  if (r.max != null) return `≤ ${fmt(r.max)} ${r.unit}`;
  return `≥ ${fmt(r.min!)} ${r.unit}`;
}

/** Limits are inclusive: a value equal to the limit passes. */
function within(r: Range, v: number): boolean {
  return (r.min == null || v >= r.min) && (r.max == null || v <= r.max);
}

function numeric(analyte: Analyte, value: number | null, unit: string, r: Range | null): AnalyteVerdict {
  if (!r) return { analyte, value, unit, limitText: "none set", source: null, result: "no-limit" };
  if (value == null) return { analyte, value, unit, limitText: rangeText(r), source: r.source, result: "missing" };
  return { analyte, value, unit, limitText: rangeText(r), source: r.source, result: within(r, value) ? "pass" : "fail" };
}

const waterUnitText: Record<WaterUnit, string> = { "mg/m3": "mg/m³", ppmv: "ppm v/v", dewpoint: "°C pressure dew point" };

/** Judges a record against a standard: every limited analyte must pass for the record to pass. */
export function judgeAirTest(standard: AirStandard, v: AirTestValues): AirTestVerdict {
  const L = airQualityLimits[standard];
  const out: AnalyteVerdict[] = [
    numeric("oxygen", v.oxygenPct, "% v/v", L.oxygen),
    numeric("co2", v.co2Ppm, "ppm v/v", L.co2),
    numeric("co", v.coPpm, "ppm v/v", L.co),
    numeric("oil", v.oilMgM3, "mg/m³", L.oil),
  ];
  const wl = L.water(v.fillBar);
  const wUnit = waterUnitText[v.waterUnit];
  if (!wl) out.push({ analyte: "water", value: v.waterValue, unit: wUnit, limitText: "none set", source: null, result: "no-limit" });
  else if (v.waterValue == null) out.push({ analyte: "water", value: null, unit: wUnit, limitText: rangeText(wl), source: wl.source, result: "missing" });
  else {
    const ppmv = waterToPpmv(v.waterValue, v.waterUnit, v.fillBar);
    const inLimitUnit = wl.unit === "ppm v/v" ? ppmv : ppmv / mgPerM3ToPpmv(1);
    const sameUnit = (wl.unit === "ppm v/v" && v.waterUnit === "ppmv") || (wl.unit === "mg/m³" && v.waterUnit === "mg/m3");
    out.push({
      analyte: "water",
      value: v.waterValue,
      unit: wUnit,
      limitText: rangeText(wl),
      source: wl.source,
      result: within(wl, sameUnit ? v.waterValue : inLimitUnit) ? "pass" : "fail",
      ...(sameUnit ? {} : { converted: { value: inLimitUnit, unit: wl.unit } }),
    });
  }
  out.push(numeric("hydrocarbons", v.hydrocarbonsPpm, "ppm v/v", L.hydrocarbons));
  out.push({
    analyte: "odour",
    value: v.odourOk,
    unit: "",
    limitText: "no significant odour or taste",
    source: L.odour.source,
    result: v.odourOk == null ? "missing" : v.odourOk ? "pass" : "fail",
  });
  return { standard, passed: out.every((a) => a.result === "pass" || a.result === "no-limit"), analytes: out };
}

/** The analytes a standard limits at this fill pressure: a record for it must give each of them. */
export function requiredAnalytes(standard: AirStandard, fillBar: number): Analyte[] {
  const L = airQualityLimits[standard];
  const out: Analyte[] = ["oxygen", "co2", "co", "oil", "odour"];
  if (L.water(fillBar)) out.push("water");
  if (L.hydrocarbons) out.push("hydrocarbons");
  return out;
}
