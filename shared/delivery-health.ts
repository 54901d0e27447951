import { FREE_AIR_REFERENCE, freeAirLitres } from "./air";

// Delivery health: how much free air a compressor really delivers, measured from each bank fill.
// A fill counts when the unit runs from about its restart pressure to its stop pressure in one run, with readings
// throughout; it is measured over its final stretch with no sign of air being drawn off the bank (see measureFill),
// as the rise of the bank's gas content (real gas, shared/air.ts) per minute. No bank temperature is sent, so the bank is
// taken at the intake (plant-room) temperature reported with each reading.

export type FillReading = {
  ts: number;
  /** Running with the motor on (loaded). */
  running: boolean;
  deliveryBar: number | null;
  intakeC: number | null;
};

export type FillUnit = {
  bankVolumeL: number;
  stopPressureBar: number;
  restartPressureBar: number;
  ratedDeliveryLpm: number;
};

export type FillDelivery = {
  startTs: number;
  endTs: number;
  fromBar: number;
  toBar: number;
  /** Bank temperature used, °C (mean intake temperature over the fill). */
  bankC: number;
  /** Free air delivered, litres (FREE_AIR_REFERENCE). */
  freeAirL: number;
  deliveryLpm: number;
  ratedLpm: number;
  /** deliveryLpm / ratedLpm. */
  share: number;
};

export const DELIVERY_RULES = {
  /** A fill must begin within this of the restart pressure and end within this of the stop pressure, bar. */
  setpointSlackBar: 3,
  /** Shortest clean stretch measured, ms. */
  minFillMs: 6 * 60_000,
  /** Readings further apart than this break the fill (comms gap). */
  maxGapMs: 60_000,
  /** The fill is cut into pieces this long; a measured piece rises within drawOffShare of the last pieces' median. */
  pieceMs: 2 * 60_000,
  drawOffShare: 0.15,
  /** The clean final stretch must cover at least this share of the restart → stop rise. */
  minCleanShare: 0.5,
  /** After the stop, the bank is watched this long: a fall faster than fallShare of the fill's rise means a draw-off. */
  watchAfterMs: 2 * 60_000,
  fallShare: 0.1,
} as const;

/** Advisory settings: the median over the last `fills` fills below `minShare` of rated raises the advisory. */
export type DeliveryAdvisorySettings = { fills: number; minShare: number };
/** Common practice, no source: a service partner looks at a unit that delivers less than about 80 % of its rating. */
export const defaultDeliveryAdvisory: DeliveryAdvisorySettings = { fills: 5, minShare: 0.8 };

type Point = { ts: number; bar: number; c: number };

/** Least-squares slope of y over t (per ms). */
function slope(ts: readonly number[], ys: readonly number[]): number {
  const n = ts.length;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    sx += ts[i]! - ts[0]!;
    sy += ys[i]!;
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = ts[i]! - ts[0]! - mx;
    sxx += dx * dx;
    sxy += dx * (ys[i]! - my);
  }
  return sxx > 0 ? sxy / sxx : 0;
}

export function median(xs: readonly number[]): number | null {
  if (xs.length === 0) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/**
 * Judges a finished run; null when it is not a fill to stop pressure with a long enough clean part.
 * A bank usually reaches its restart pressure because cylinders are being filled from it, and they often go on filling
 * for the first minutes of the run. So the fill is cut into pieces counted back from the stop, and measured over the
 * longest final stretch whose pieces all rise at the same rate (within drawOffShare); that stretch must cover at least
 * minCleanShare of the restart → stop rise.
 */
export function measureFill(unit: FillUnit, points: readonly Point[], after: readonly Point[]): FillDelivery | null {
  const r = DELIVERY_RULES;
  if (!(unit.bankVolumeL > 0) || !(unit.ratedDeliveryLpm > 0) || points.length < 6) return null;
  const last = points[points.length - 1]!;
  if (points[0]!.bar > unit.restartPressureBar + r.setpointSlackBar) return null;
  if (last.bar < unit.stopPressureBar - r.setpointSlackBar) return null;
  for (let i = 1; i < points.length; i++) if (points[i]!.ts - points[i - 1]!.ts > r.maxGapMs) return null;

  const content = points.map((p) => freeAirLitres(unit.bankVolumeL, p.bar, p.c));
  const ts = points.map((p) => p.ts);

  // pieces counted back from the stop: [from, to) index ranges and their rise rates (l/ms)
  const pieces: { from: number; rate: number }[] = [];
  let to = points.length;
  for (let k = 1; to > 0; k++) {
    const edge = last.ts - k * r.pieceMs;
    let from = to;
    while (from > 0 && ts[from - 1]! >= edge) from--;
    if (to - from < 4 || ts[to - 1]! - ts[from]! < r.pieceMs / 2) break;
    pieces.push({ from, rate: slope(ts.slice(from, to), content.slice(from, to)) });
    to = from;
  }
  const typical = median(pieces.slice(0, 3).map((x) => x.rate));
  if (typical === null || !(typical > 0)) return null;
  let start = -1;
  for (const piece of pieces) {
    if (Math.abs(piece.rate - typical) > r.drawOffShare * typical) break;
    start = piece.from;
  }
  if (start < 0) return null;
  const first = points[start]!;
  if (last.ts - first.ts < r.minFillMs) return null;
  if (last.bar - first.bar < r.minCleanShare * (unit.stopPressureBar - unit.restartPressureBar)) return null;

  // Just after the stop the bank should hold: falling fast means air was being drawn off, likely during the fill too.
  if (after.length >= 4) {
    const fall = -slope(
      after.map((p) => p.ts),
      after.map((p) => freeAirLitres(unit.bankVolumeL, p.bar, p.c)),
    );
    if (fall > r.fallShare * typical) return null;
  }

  const clean = points.slice(start);
  const bankC = clean.reduce((sum, p) => sum + p.c, 0) / clean.length;
  const minutes = (last.ts - first.ts) / 60_000;
  // the least-squares rise over the clean stretch: less noisy than its two end readings
  const deliveryLpm = slope(ts.slice(start), content.slice(start)) * 60_000;
  return {
    startTs: first.ts,
    endTs: last.ts,
    fromBar: first.bar,
    toBar: last.bar,
    bankC: Math.round(bankC * 10) / 10,
    freeAirL: Math.round(deliveryLpm * minutes),
    deliveryLpm: Math.round(deliveryLpm * 10) / 10,
    ratedLpm: unit.ratedDeliveryLpm,
    share: Math.round((deliveryLpm / unit.ratedDeliveryLpm) * 1000) / 1000,
  };
}

/**
 * Follows one compressor's readings in time order and reports each clean fill once the watch after its stop is over.
 * O(readings of one fill) memory; the unit's settings are read at each call, so a change applies from the next fill.
 */
export class FillTracker {
  private run: Point[] = [];
  private done: Point[] | null = null;
  private after: Point[] = [];
  private lastTs = -Infinity;
  private unit: FillUnit | null = null;

  /** Feeds one reading; returns a fill when one has just been judged clean. */
  add(r: FillReading, unit: FillUnit): FillDelivery | null {
    if (!(r.ts > this.lastTs)) return null;
    this.unit = unit;
    const gap = r.ts - this.lastTs > DELIVERY_RULES.maxGapMs;
    this.lastTs = r.ts;
    const p: Point | null = r.deliveryBar === null ? null : { ts: r.ts, bar: r.deliveryBar, c: r.intakeC ?? FREE_AIR_REFERENCE.tC };
    let out: FillDelivery | null = null;
    if (this.done) {
      // watching the bank after a stop
      if (r.running || gap || !p) out = this.finish();
      else {
        this.after.push(p);
        if (r.ts - this.done[this.done.length - 1]!.ts >= DELIVERY_RULES.watchAfterMs) out = this.finish();
      }
    }
    if (r.running && p) {
      if (gap) this.run = [];
      this.run.push(p);
    } else if (this.run.length > 0) {
      if (!gap && p) {
        this.done = this.run;
        this.after = [p];
      }
      this.run = [];
    }
    return out;
  }

  /** Judges the fill being watched, with what was seen after it. */
  private finish(): FillDelivery | null {
    const points = this.done!;
    const after = this.after;
    this.done = null;
    this.after = [];
    return this.unit ? measureFill(this.unit, points, after) : null;
  }
}

/** The advisory's condition: the median share of the last fills, and whether it is below the setting. */
export function deliveryAdvisory(shares: readonly number[], settings: DeliveryAdvisorySettings): { median: number | null; low: boolean } {
  const recent = shares.slice(-settings.fills);
  const m = recent.length >= settings.fills ? median(recent) : null;
  return { median: m, low: m !== null && m < settings.minShare };
}

/** What the compressor page shows: the measured fills (oldest first) and the advisory's judgement of the last ones. */
export type DeliveryHealthResponse = {
  fills: FillDelivery[];
  settings: DeliveryAdvisorySettings;
  /** Median share of rated over the last settings.fills fills; null with fewer fills. */
  median: number | null;
  low: boolean;
};

/** The monthly report's delivery-health line for one compressor: its fills that ended in the month. */
export type DeliveryMonthRow = {
  compressorId: number;
  compressorName: string;
  siteName: string;
  fills: number;
  /** Median over the month's fills; null without fills (no data, not zero). */
  medianLpm: number | null;
  medianShare: number | null;
  ratedLpm: number | null;
  /** Median below the advisory's share of rated. */
  low: boolean;
};
