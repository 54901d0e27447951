import { MAX_STAGES, runStates, type Telemetry, TELEMETRY_VERSION } from "@/shared/telemetry";

// A hand-written check of the common case, several times cheaper than the zod schema. It only ever says yes to
// what telemetrySchema accepts (a test compares them at every boundary); anything else goes to zod, which stays
// the authority and gives the reason.

const KEYS = new Set([
  "v",
  "seq",
  "ts",
  "runState",
  "motorOn",
  "deliveryBar",
  "stageBar",
  "stageC",
  "oilBar",
  "purifierC",
  "intakeC",
  "hourMeterH",
  "starts",
  "tripCode",
]);
const RUN_STATES = new Set<unknown>(runStates);

const inRange = (x: unknown, min: number, max: number): boolean =>
  typeof x === "number" && Number.isFinite(x) && x >= min && x <= max;
const optionalInRange = (x: unknown, min: number, max: number): boolean =>
  x === undefined || x === null || inRange(x, min, max);
const intInRange = (x: unknown, min: number, max: number): boolean =>
  Number.isSafeInteger(x) && (x as number) >= min && (x as number) <= max;

function stages(x: unknown, min: number, max: number): boolean {
  if (x === undefined) return true;
  if (!Array.isArray(x) || x.length > MAX_STAGES) return false;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (v !== null && !inRange(v, min, max)) return false;
  }
  return true;
}

export function isTelemetryFast(o: unknown): o is Telemetry {
  if (typeof o !== "object" || o === null || Array.isArray(o)) return false;
  const r = o as Record<string, unknown>;
  for (const k in r) if (!KEYS.has(k)) return false;
  return (
    r.v === TELEMETRY_VERSION &&
    intInRange(r.seq, 0, Number.MAX_SAFE_INTEGER) &&
    intInRange(r.ts, 1, Number.MAX_SAFE_INTEGER) &&
    RUN_STATES.has(r.runState) &&
    typeof r.motorOn === "boolean" &&
    inRange(r.deliveryBar, -1, Number.MAX_VALUE) &&
    stages(r.stageBar, -1, Number.MAX_VALUE) &&
    stages(r.stageC, -50, 350) &&
    optionalInRange(r.oilBar, -1, 30) &&
    optionalInRange(r.purifierC, -50, 150) &&
    optionalInRange(r.intakeC, -50, 80) &&
    inRange(r.hourMeterH, 0, 1_000_000) &&
    intInRange(r.starts, 0, 1_000_000_000) &&
    (r.tripCode === undefined || r.tripCode === null || intInRange(r.tripCode, 0, 65_535))
  );
}
