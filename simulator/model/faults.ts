import { Random } from "./random";
import { DAY_MS } from "./local-time";

export const faultKinds = [
  "cooling",
  "oil",
  "sensor-null",
  "sensor-frozen",
  "sensor-range",
  "comms-silent",
  "comms-drop",
  "worn-valves",
] as const;
export type FaultKind = (typeof faultKinds)[number];

/** Faults the transport layer plays out (the machine keeps running); the rest act on the physical model. */
export const commsFaults: readonly FaultKind[] = ["comms-silent", "comms-drop"];
export const isCommsFault = (k: FaultKind) => commsFaults.includes(k);

export type FaultSpec = {
  deviceId: string;
  kind: FaultKind;
  /** Model time the fault begins, ms since the epoch. */
  atMs: number;
  /** How long until it clears by itself; null = until the technician resets the trip it causes. */
  durationMs: number | null;
  /** Stage index (0-based) a sensor or valve fault affects; default the final stage (sensors) or stage 2 (valves). */
  stage?: number;
  /** How long a heat or oil fault takes to develop fully, ms; drawn from the seed when absent. */
  rampMs?: number;
  /** Whether a cooling fault trips the fan's own motor protection before the stage overheats; drawn when absent. */
  fanTrip?: boolean;
};

const MIN = 60_000;

export function defaultDurationMs(kind: FaultKind): number | null {
  switch (kind) {
    case "cooling":
    case "oil":
      return null;
    case "sensor-null":
    case "sensor-range":
      return null;
    case "sensor-frozen":
      return 120 * MIN;
    case "comms-silent":
      return 20 * MIN;
    case "comms-drop":
      return 15 * MIN;
    case "worn-valves":
      return 7 * DAY_MS;
  }
}

/**
 * Parses `<device>:<kind>[/<stage>]@<minutes>[+<duration minutes>]`, minutes counted in model time from `startMs`.
 * Example: `fs1-c1:cooling@10`, `dc-c2:sensor-frozen/2@30+45`.
 */
export function parseFaultSpec(text: string, startMs: number): FaultSpec {
  const m = /^([a-z0-9][a-z0-9-]*):([a-z-]+)(?:\/(\d))?@(\d+(?:\.\d+)?)(?:\+(\d+(?:\.\d+)?))?$/.exec(text.trim());
  if (!m) throw new Error(`fault "${text}": expected <device>:<kind>@<minutes>, e.g. fs1-c1:cooling@10`);
  const [, deviceId, kind, stage, at, duration] = m;
  if (!(faultKinds as readonly string[]).includes(kind!)) {
    throw new Error(`fault "${text}": kind must be one of ${faultKinds.join(", ")}`);
  }
  const k = kind as FaultKind;
  return {
    deviceId: deviceId!,
    kind: k,
    atMs: startMs + Math.round(Number(at) * MIN),
    durationMs: duration !== undefined ? Math.round(Number(duration) * MIN) : defaultDurationMs(k),
    ...(stage !== undefined ? { stage: Number(stage) - 1 } : {}),
  };
}

export type IncidentDevice = { deviceId: string; oilPump: boolean };

/**
 * The demo script: about `perDay` incidents a day across the fleet, drawn per UTC day from the seed,
 * so any window over the same days gets the same incidents.
 */
export function demoIncidents(
  seed: string,
  devices: readonly IncidentDevice[],
  fromMs: number,
  toMs: number,
  perDay: number,
): FaultSpec[] {
  if (perDay <= 0 || devices.length === 0) return [];
  const out: FaultSpec[] = [];
  for (let day = Math.floor(fromMs / DAY_MS); day * DAY_MS < toMs; day++) {
    const r = new Random(`${seed}:incidents:${perDay}:${day}`);
    const count = r.poisson(perDay);
    for (let i = 0; i < count; i++) {
      const device = r.pick(devices);
      const kind = r.weighted<FaultKind>([
        ["cooling", 0.22],
        ["oil", device.oilPump ? 0.12 : 0],
        ["sensor-null", 0.07],
        ["sensor-frozen", 0.08],
        ["sensor-range", 0.06],
        ["comms-silent", 0.13],
        ["comms-drop", 0.17],
        ["worn-valves", 0.05],
      ]);
      const atMs = day * DAY_MS + Math.floor(r.next() * DAY_MS);
      let durationMs = defaultDurationMs(kind);
      if (kind === "comms-silent" || kind === "comms-drop") durationMs = Math.round(r.uniform(4, 45) * MIN);
      if (kind === "sensor-frozen") durationMs = Math.round(r.uniform(1, 8) * 60 * MIN);
      if (kind === "worn-valves") durationMs = Math.round(r.uniform(6, 14) * DAY_MS);
      if (atMs >= fromMs && atMs < toMs) out.push({ deviceId: device.deviceId, kind, atMs, durationMs });
    }
  }
  return out.sort((a, b) => a.atMs - b.atMs);
}
