import { describe, expect, it } from "vitest";
import { isTelemetryFast } from "@/lib/ingester/fast-telemetry";
import { telemetrySchema } from "@/shared/telemetry";

const base = {
  v: 1,
  seq: 10,
  ts: 1_750_000_000_000,
  runState: "running",
  motorOn: true,
  deliveryBar: 212.5,
  stageBar: [5.8, 38, 160],
  stageC: [110, 125, null],
  oilBar: 4.2,
  purifierC: 28,
  intakeC: 18,
  hourMeterH: 1520.25,
  starts: 310,
  tripCode: null,
} as Record<string, unknown>;

const DROP = Symbol("drop");
const common = [DROP, null, "1", true, {}, [], Number.NaN, Infinity, -Infinity];
const around = (...xs: number[]) => xs.flatMap((x) => [x, x - 1e-9, x + 1e-9, x - 1, x + 1]);
const stageArrays = (min: number, max: number) => [
  [],
  [null],
  [min, max, null, min],
  [min, max, null, min, max],
  [min - 0.001],
  [max + 0.001],
  ["1"],
  [Infinity],
  [null, null, null, null],
];

const candidates: Record<string, unknown[]> = {
  v: [1, 0, 2, 1.0000001],
  seq: [...around(0, Number.MAX_SAFE_INTEGER), 1.5, 2 ** 53, -0],
  ts: [...around(0, 1), 1.5, Number.MAX_SAFE_INTEGER, 2 ** 53, 1e300],
  runState: ["stopped", "standby", "starting", "running", "tripped", "Running", ""],
  motorOn: [true, false, 0, 1, "true"],
  deliveryBar: [...around(-1, 700, 0), 1e300, Number.MAX_VALUE],
  stageBar: stageArrays(-1, 1e300),
  stageC: stageArrays(-50, 350),
  oilBar: around(-1, 30),
  purifierC: around(-50, 150),
  intakeC: around(-50, 80),
  hourMeterH: around(0, 1_000_000),
  starts: [...around(0, 1_000_000_000), 2.5],
  tripCode: [...around(0, 65_535), 7.5],
};

function variant(field: string, value: unknown): Record<string, unknown> {
  const o = { ...base };
  if (value === DROP) delete o[field];
  else o[field] = value;
  return o;
}

describe("fast telemetry check agrees with the zod schema", () => {
  it("on every single-field boundary and type mutation", () => {
    let n = 0;
    for (const [field, values] of Object.entries(candidates)) {
      for (const value of [...values, ...common]) {
        const o = variant(field, value);
        const zod = telemetrySchema.safeParse(o).success;
        const fast = isTelemetryFast(o);
        expect({ field, value: String(value), fast }).toEqual({ field, value: String(value), fast: zod });
        n++;
      }
    }
    expect(n).toBeGreaterThan(250);
  });

  it("on random combinations, extra keys and non-objects", () => {
    let seed = 42;
    const rand = () => ((seed = (seed * 1_103_515_245 + 12_345) % 2 ** 31) / 2 ** 31);
    const fields = Object.keys(candidates);
    for (let i = 0; i < 3_000; i++) {
      const o = { ...base };
      for (let k = 0; k < 3; k++) {
        const f = fields[Math.floor(rand() * fields.length)]!;
        const pool = [...candidates[f]!, ...common];
        const v = pool[Math.floor(rand() * pool.length)];
        if (v === DROP) delete o[f];
        else o[f] = v;
      }
      expect(isTelemetryFast(o)).toBe(telemetrySchema.safeParse(o).success);
    }
    for (const x of [null, 1, "x", [], [base], { ...base, extra: 1 }, JSON.parse('{"__proto__": {"v": 1}}')]) {
      expect(isTelemetryFast(x)).toBe(telemetrySchema.safeParse(x).success);
    }
  });
});
