import { Random } from "./random";
import { localTime, localToUtc, southernHemisphere } from "./local-time";

export const profiles = ["fire", "dive", "industrial"] as const;
export type Profile = (typeof profiles)[number];

export type Cylinder = { volumeL: number; targetBar: number; residualBar: number };

/** A batch of cylinders filled from the bank, `parallel` at a time (whips on the fill panel). */
export type FillBatch = {
  kind: "fill";
  startMs: number;
  label: string;
  cylinders: Cylinder[];
  parallel: number;
  /** Seconds per cylinder at full flow; fills are kept slow so cylinders do not heat up. */
  fillSeconds: number;
  changeoverSeconds: number;
};

/** Airline breathing sets drawing free air continuously from the bank. */
export type AirlineDraw = { kind: "airline"; startMs: number; endMs: number; freeAirLpm: number };

/** The operator switching the compressor to automatic (on) or off. */
export type OperatorSwitch = { kind: "switch"; startMs: number; on: boolean };

export type DemandEvent = FillBatch | AirlineDraw | OperatorSwitch;

export type DemandSite = {
  deviceId: string;
  profile: Profile;
  timeZone: string;
  stopPressureBar: number;
  ratedDeliveryLpm: number;
};

/** Smaller machines serve fewer cylinders: batch sizes scale with delivery against a 250 l/min reference. */
const capacity = (site: DemandSite) => Math.min(1.5, Math.max(0.25, site.ratedDeliveryLpm / 250));

type CylinderType = { volumeL: number; ratingBar: number };

function cylinderMenu(site: DemandSite): (readonly [CylinderType, number])[] {
  const hp = site.stopPressureBar >= 300;
  switch (site.profile) {
    case "fire":
      return hp
        ? [
            [{ volumeL: 6.8, ratingBar: 300 }, 0.8],
            [{ volumeL: 9, ratingBar: 300 }, 0.2],
          ]
        : [[{ volumeL: 6, ratingBar: 200 }, 1]];
    case "dive":
      return [
        [{ volumeL: 12, ratingBar: site.stopPressureBar >= 240 ? 232 : 200 }, 0.6],
        [{ volumeL: 15, ratingBar: site.stopPressureBar >= 240 ? 232 : 200 }, 0.2],
        [{ volumeL: 10, ratingBar: hp ? 300 : 200 }, 0.2],
      ];
    case "industrial":
      return [
        [{ volumeL: 9, ratingBar: hp ? 300 : 200 }, 0.7],
        [{ volumeL: 6.8, ratingBar: hp ? 300 : 200 }, 0.3],
      ];
  }
}

function cylinders(r: Random, site: DemandSite, count: number, residual: [number, number]): Cylinder[] {
  const menu = cylinderMenu(site);
  const out: Cylinder[] = [];
  for (let i = 0; i < count; i++) {
    const type = r.weighted(menu);
    const targetBar = Math.min(type.ratingBar, site.stopPressureBar - 5);
    out.push({ volumeL: type.volumeL, targetBar, residualBar: Math.min(r.uniform(residual[0], residual[1]), targetBar - 20) });
  }
  return out;
}

function batch(
  r: Random,
  site: DemandSite,
  startMs: number,
  label: string,
  count: number,
  residual: [number, number],
  parallel: number,
): FillBatch {
  return {
    kind: "fill",
    startMs,
    label,
    cylinders: cylinders(r, site, count, residual),
    parallel,
    fillSeconds: r.uniform(150, 270),
    changeoverSeconds: r.uniform(40, 100),
  };
}

// Relative likelihood of a call-out by local hour (invented, busier afternoons and evenings).
const callOutWeights: (readonly [number, number])[] = Array.from({ length: 24 }, (_, h) => [
  h,
  h < 6 ? 0.35 : h < 11 ? 0.9 : h < 18 ? 1.4 : h < 23 ? 1.2 : 0.6,
]);

/** Everything that draws air from one compressor's bank during one local calendar day. Same inputs → same plan. */
export function planDay(site: DemandSite, seed: string, day: number): DemandEvent[] {
  const r = new Random(`${seed}:${site.deviceId}:demand:${day}`);
  const tz = site.timeZone;
  const at = (hour: number) => localToUtc(tz, day, hour);
  const lt = localTime(tz, at(12));
  const events: DemandEvent[] = [];
  const cap = capacity(site);
  const size = (min: number, max: number) => Math.max(1, Math.round(r.uniform(min, max) * cap));

  if (site.profile === "fire") {
    // watch changes at 08:00 and 18:00: breathing-apparatus checks top up a few cylinders
    for (const h of [8, 18]) {
      const n = Math.round(r.int(0, 4) * cap);
      if (n > 0) events.push(batch(r, site, at(h + r.uniform(0.1, 0.6)), "Watch-change BA checks", n, [240, 285], 2));
    }
    const callOuts = r.poisson(1.1);
    for (let i = 0; i < callOuts; i++) {
      const h = r.weighted(callOutWeights) + r.next();
      const back = h + r.uniform(1, 3.5);
      const large = r.chance(0.06);
      const n = large ? size(18, 36) : size(4, 14);
      events.push(batch(r, site, at(back), large ? "Refill after large incident" : "Refill after incident", n, [20, 150], r.int(2, 3)));
    }
    if (lt.weekday === 3 && r.chance(0.6)) {
      events.push(batch(r, site, at(r.uniform(14, 15.5)), "Refill after BA training", size(6, 16), [30, 120], 3));
    }
  } else if (site.profile === "dive") {
    const season = isHighSeason(tz, lt.month) ? 1 : 0.45;
    const weekend = lt.weekday === 0 || lt.weekday === 6 ? 2.2 : 1;
    const closed = season < 1 && lt.weekday === 1;
    if (!closed) {
      const f = season * weekend;
      const scaled = (min: number, max: number) => Math.max(0, Math.round(r.uniform(min, max) * f * cap));
      const morning = scaled(3, 9);
      if (morning > 0) events.push(batch(r, site, at(r.uniform(7, 8.5)), "Morning fills", morning, [20, 80], 4));
      const midday = scaled(2, 7);
      if (midday > 0) events.push(batch(r, site, at(r.uniform(12, 13.5)), "Second-dive fills", midday, [30, 90], 4));
      const evening = scaled(5, 13);
      if (evening > 0) events.push(batch(r, site, at(r.uniform(15.5, 18)), "Refill returned cylinders", evening, [20, 70], 4));
    }
  } else {
    const workday = lt.weekday >= 1 && lt.weekday <= 5;
    if (workday) {
      events.push({ kind: "switch", startMs: at(r.uniform(6.2, 6.8)), on: true });
      events.push({ kind: "switch", startMs: at(r.uniform(17.5, 18.5)), on: false });
      if (r.chance(0.7)) {
        const workers = r.int(1, 3);
        const lpm = Math.min(workers * r.uniform(150, 250), site.ratedDeliveryLpm * 0.85);
        events.push({ kind: "airline", startMs: at(r.uniform(7.9, 8.3)), endMs: at(r.uniform(11.8, 12.2)), freeAirLpm: lpm });
        events.push({ kind: "airline", startMs: at(r.uniform(12.7, 13.1)), endMs: at(r.uniform(16, 16.8)), freeAirLpm: lpm });
      }
      const singles = r.poisson(3);
      for (let i = 0; i < singles; i++) {
        events.push(batch(r, site, at(r.uniform(7, 16)), "Escape-set cylinder fill", 1, [30, 150], 1));
      }
    }
  }
  return events.sort((a, b) => a.startMs - b.startMs);
}

function isHighSeason(timeZone: string, month: number): boolean {
  const m = southernHemisphere(timeZone) ? (month + 6) % 12 : month;
  return m >= 3 && m <= 9;
}

