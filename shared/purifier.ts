/**
 * Purifier cartridge life from the water it has actually taken up. Air leaves the final separator saturated at the
 * purifier's pressure and temperature (shared/water.ts); the cartridge is taken to hold back all of it (the water that
 * passes a working cartridge is a few per cent of what enters, so this errs towards an early change).
 */
import { barGaugeToPaAbs, waterPerFreeAirM3 } from "./water";

export const HOUR_MS = 3_600_000;
export const DAY_MS = 86_400_000;
/** Duty and temperatures of this window predict the date a cartridge reaches 100 %. */
export const RECENT_WINDOW_MS = 30 * DAY_MS;
/** Default back-pressure (minimum-pressure) valve setting, bar gauge (common practice: 120–150 bar on breathing-air units). */
export const DEFAULT_BACK_PRESSURE_BAR = 150;
export const DEFAULT_ADVISORY_PCT = 80;

export type CartridgeRating =
  | { kind: "water-g"; value: number; refBar: number; refC: number }
  /** Free air (m³) the supplier rates the cartridge for, at refBar gauge and refC at the purifier. */
  | { kind: "air-m3"; value: number; refBar: number; refC: number };

export type PurifierSpec = {
  ratedDeliveryLpm: number;
  backPressureBar: number;
  rating: CartridgeRating;
};

/** One stretch of rollup: seconds the motor ran and the stretch's mean purifier temperature and pressures. */
export type DutyBucket = {
  runS: number;
  purifierC: number | null;
  purifierBar: number | null;
  deliveryBar: number | null;
};

/** Purifier pressure: as reported, else the larger of the delivery pressure and the back-pressure valve setting. */
export function purifierPressureBar(spec: Pick<PurifierSpec, "backPressureBar">, b: Pick<DutyBucket, "purifierBar" | "deliveryBar">): number {
  return b.purifierBar ?? Math.max(b.deliveryBar ?? 0, spec.backPressureBar);
}

/** Grams of water per hour of running at rated delivery, saturated at the given purifier pressure and temperature. */
export function waterPerRunHour(ratedDeliveryLpm: number, bar: number, tC: number): number {
  return (ratedDeliveryLpm * 60) / 1000 * waterPerFreeAirM3(barGaugeToPaAbs(bar), tC);
}

export function capacityGrams(r: CartridgeRating): number {
  return r.kind === "water-g" ? r.value : r.value * waterPerFreeAirM3(barGaugeToPaAbs(r.refBar), r.refC);
}

/** Running hours the cartridge would last at rated delivery and its reference condition: the count by hours alone. */
export function capacityRunHours(spec: PurifierSpec): number {
  return capacityGrams(spec.rating) / waterPerRunHour(spec.ratedDeliveryLpm, spec.rating.refBar, spec.rating.refC);
}

export type Usage = { waterG: number; runS: number; freeAirM3: number };
export const emptyUsage = (): Usage => ({ waterG: 0, runS: 0, freeAirM3: 0 });

/** Adds a bucket's water to a running total (free air = rated delivery × running time). */
export function addBucket(u: Usage, spec: PurifierSpec, b: DutyBucket): void {
  if (!(b.runS > 0)) return;
  const freeAir = ((spec.ratedDeliveryLpm / 1000) * b.runS) / 60;
  const tC = b.purifierC ?? spec.rating.refC;
  u.waterG += freeAir * waterPerFreeAirM3(barGaugeToPaAbs(purifierPressureBar(spec, b)), tC);
  u.runS += b.runS;
  u.freeAirM3 += freeAir;
}

export type CartridgeStatus = {
  capacityG: number;
  waterG: number;
  usedPct: number;
  runH: number;
  freeAirM3: number;
  /** Running hours and calendar date to 100 % at the recent duty and temperatures; null without recent running. */
  hoursToFull: number | null;
  fullAt: number | null;
  /** The same by running hours alone at the reference condition. */
  hoursOnly: { capacityH: number; usedPct: number; hoursToFull: number; fullAt: number | null };
  /** Mean water per running hour recently, g/h. */
  recentGPerRunH: number | null;
};

/**
 * Since-change usage plus the recent window's usage (over `recentSpanMs` of calendar time) → the figures people see.
 */
export function cartridgeStatus(spec: PurifierSpec, used: Usage, recent: Usage, recentSpanMs: number, now: number): CartridgeStatus {
  const capacityG = capacityGrams(spec.rating);
  const remainingG = Math.max(0, capacityG - used.waterG);
  const recentRunH = recent.runS / 3600;
  const gPerRunH = recentRunH > 0 ? recent.waterG / recentRunH : null;
  const runHPerMs = recentSpanMs > 0 ? recentRunH / recentSpanMs : 0;
  const hoursToFull = gPerRunH ? remainingG / gPerRunH : null;
  const fullAt = hoursToFull != null && runHPerMs > 0 ? now + hoursToFull / runHPerMs : null;
  const capacityH = capacityRunHours(spec);
  const runH = used.runS / 3600;
  const hoursLeft = Math.max(0, capacityH - runH);
  return {
    capacityG,
    waterG: used.waterG,
    usedPct: capacityG > 0 ? (100 * used.waterG) / capacityG : 0,
    runH,
    freeAirM3: used.freeAirM3,
    hoursToFull,
    fullAt,
    hoursOnly: {
      capacityH,
      usedPct: capacityH > 0 ? (100 * runH) / capacityH : 0,
      hoursToFull: hoursLeft,
      fullAt: runHPerMs > 0 ? now + hoursLeft / runHPerMs : null,
    },
    recentGPerRunH: gPerRunH,
  };
}

export type CartridgeLevel = "ok" | "advisory" | "warning";

export function cartridgeLevel(usedPct: number, advisoryPct: number): CartridgeLevel {
  return usedPct >= 100 ? "warning" : usedPct >= advisoryPct ? "advisory" : "ok";
}
