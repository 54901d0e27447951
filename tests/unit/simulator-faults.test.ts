import { describe, expect, it } from "vitest";
import { tripCode, tripCodeInfo, tripCodes } from "@/shared/trip-codes";
import { DeviceSim } from "@/simulator/device-sim";
import type { DemoDevice } from "@/simulator/devices";
import { CompressorModel, type CompressorSpec, MACHINE_LIMITS, type ModelEvent, type ModelReading } from "@/simulator/model/compressor";
import { demoIncidents, type FaultKind, type FaultSpec, parseFaultSpec } from "@/simulator/model/faults";

const spec: CompressorSpec = {
  deviceId: "t-dive",
  stages: 3,
  ratedDeliveryLpm: 250,
  ratedPressureBar: 330,
  stopPressureBar: 300,
  restartPressureBar: 260,
  bankVolumeL: 600,
  profile: "dive",
  timeZone: "Europe/Malta",
  oilPump: true,
};
const T0 = Date.UTC(2025, 5, 2);
const MIN = 60_000;

type Trace = { t: number; r: ModelReading; events: ModelEvent[]; trueFinal: number; oil: number };

function faulted(kind: FaultKind, opts: { atMin?: number; durationMin?: number | null; bankBar?: number; seconds?: number; stage?: number } = {}) {
  const m = new CompressorModel(spec, { seed: "faults", startMs: T0, demand: false, fixedAmbientC: 25, init: { bankBar: opts.bankBar ?? 150 } });
  const f: FaultSpec = {
    deviceId: spec.deviceId,
    kind,
    atMs: T0 + (opts.atMin ?? 1) * MIN,
    durationMs: opts.durationMin === undefined ? null : opts.durationMin === null ? null : opts.durationMin * MIN,
    ...(opts.stage !== undefined ? { stage: opts.stage } : {}),
  };
  m.schedule([f]);
  const trace: Trace[] = [];
  for (let i = 0; i < (opts.seconds ?? 3 * 3600); i++) {
    const events = m.step(1);
    trace.push({ t: m.timeMs, r: m.reading(), events, trueFinal: m.stageTemperaturesC[spec.stages - 1]!, oil: m.oilPressureBar });
  }
  return { m, trace, trips: trace.flatMap((x) => x.events.filter((e) => e.kind === "trip").map((e) => ({ e, at: x }))) };
}

describe("scripted faults", () => {
  it("cooling loss: the final-stage temperature climbs until the machine trips, then a technician resets it", () => {
    const { trace, trips } = faulted("cooling", { atMin: 1 });
    expect(trips).toHaveLength(1);
    const { e } = trips[0]!;
    expect(e.tripCode).toBe(tripCode("final-stage-overtemp"));
    expect(e.runState).toBe("tripped");
    const i = trace.findIndex((x) => x.events.includes(e));
    expect(trace[i]!.trueFinal).toBeGreaterThan(MACHINE_LIMITS.finalStageTripC);
    // a visible climb: ten minutes before the trip it was well below the limit
    expect(trace[i - 600]!.trueFinal).toBeLessThan(MACHINE_LIMITS.finalStageTripC - 30);
    // while tripped the gateway reports the code and the motor is off
    expect(trace[i + 10]!.r).toMatchObject({ runState: "tripped", tripCode: e.tripCode, motorOn: false });
    const reset = trace.slice(i).find((x) => x.events.some((ev) => ev.text === "Trip reset"));
    expect(reset).toBeDefined();
    expect((reset!.t - e.ts) / MIN).toBeGreaterThanOrEqual(20);
    expect(reset!.r.tripCode).toBeNull();
  });

  it("cooling loss trips on the final stage or the fan's own protection, never silently", () => {
    const codes = new Set<number>();
    for (let k = 0; k < 12; k++) {
      const { trips } = faulted("cooling", { atMin: 1 + k * 1.7, seconds: 2 * 3600 });
      expect(trips.length).toBeGreaterThanOrEqual(1);
      codes.add(trips[0]!.e.tripCode!);
    }
    expect([...codes].every((c) => c === tripCode("final-stage-overtemp") || c === tripCode("cooling-fan"))).toBe(true);
    expect(codes.has(tripCode("final-stage-overtemp"))).toBe(true);
  });

  it("oil pressure loss: oil pressure falls below the trip limit and the machine trips", () => {
    const { trace, trips } = faulted("oil", { atMin: 1 });
    expect(trips[0]!.e.tripCode).toBe(tripCode("oil-pressure-low"));
    const i = trace.findIndex((x) => x.events.includes(trips[0]!.e));
    expect(trace[i - 1]!.oil).toBeLessThan(MACHINE_LIMITS.oilTripBar);
    expect(trace[60]!.oil).toBeGreaterThan(3);
  });

  it("sensor failure, open circuit: the stage reads null and the machine trips on a sensor fault", () => {
    const { trace, trips } = faulted("sensor-null", { atMin: 2 });
    expect(trace[200]!.r.stageC[spec.stages - 1]).toBeNull();
    expect(trace[200]!.r.stageC[0]).not.toBeNull();
    expect(trips[0]!.e.tripCode).toBe(tripCode("temperature-sensor"));
  });

  it("sensor failure, out of range: the stage reads the bottom of the scale and the machine trips", () => {
    const { trace, trips } = faulted("sensor-range", { atMin: 2, stage: 1 });
    expect(trace[200]!.r.stageC[1]).toBe(-49);
    expect(trips[0]!.e.tripCode).toBe(tripCode("temperature-sensor"));
  });

  it("sensor failure, frozen: the reading sticks while the stage heats up, and nothing trips", () => {
    const { trace, trips } = faulted("sensor-frozen", { atMin: 0.5, durationMin: 30, seconds: 3600 });
    const frozen = trace.slice(60, 25 * 60).map((x) => x.r.stageC[spec.stages - 1]);
    expect(new Set(frozen).size).toBe(1);
    expect(trace[25 * 60]!.trueFinal - trace[60]!.trueFinal).toBeGreaterThan(20);
    expect(trips).toHaveLength(0);
    // after the fault clears the sensor reads again
    const after = trace.slice(31 * 60, 40 * 60).map((x) => x.r.stageC[spec.stages - 1]);
    expect(new Set(after).size).toBeGreaterThan(5);
  });

  it("worn valves: lower delivery and a longer fill, with no trip", () => {
    const fillSeconds = (kind: FaultKind | null) => {
      const m = new CompressorModel(spec, { seed: "valves", startMs: T0, demand: false, fixedAmbientC: 20, init: { bankBar: 259.9 } });
      if (kind) m.schedule([{ deviceId: spec.deviceId, kind, atMs: T0 - 10 * 86_400_000, durationMs: 30 * 86_400_000 }]);
      let running = 0;
      for (let i = 0; i < 4 * 3600; i++) {
        for (const e of m.step(1)) {
          if (e.runState === "running") running = e.ts;
          if (e.text === "Stop pressure reached") return (e.ts - running) / 1000;
          expect(e.kind).not.toBe("trip");
        }
      }
      throw new Error("never reached stop pressure");
    };
    const healthy = fillSeconds(null);
    const worn = fillSeconds("worn-valves");
    // full wear takes 30 % off the delivery: 1 / 0.7 ≈ 1.43 times as long
    expect(worn / healthy).toBeGreaterThan(1.38);
    expect(worn / healthy).toBeLessThan(1.48);
  });

  it("communication faults leave the machine running and only change what the link does", () => {
    const device: DemoDevice = {
      deviceId: spec.deviceId,
      secret: "not-a-real-secret",
      siteCode: "test-site",
      timeZone: spec.timeZone,
      compressorId: 1,
      name: "Test",
      stages: spec.stages,
      ratedDeliveryLpm: spec.ratedDeliveryLpm,
      ratedPressureBar: spec.ratedPressureBar,
      stopPressureBar: spec.stopPressureBar,
      restartPressureBar: spec.restartPressureBar,
      bankVolumeL: spec.bankVolumeL,
      profile: "dive",
    };
    const sim = new DeviceSim(device, {
      seed: "comms",
      startMs: T0,
      faults: [
        { deviceId: device.deviceId, kind: "comms-silent", atMs: T0 + 10 * MIN, durationMs: 5 * MIN },
        { deviceId: device.deviceId, kind: "comms-drop", atMs: T0 + 30 * MIN, durationMs: 5 * MIN },
        { deviceId: "someone-else", kind: "comms-drop", atMs: T0, durationMs: 60 * MIN },
      ],
    });
    expect(sim.commsAt(T0 + 5 * MIN).state).toBe("ok");
    expect(sim.commsAt(T0 + 12 * MIN).state).toBe("silent");
    expect(sim.commsAt(T0 + 16 * MIN).state).toBe("ok");
    expect(sim.commsAt(T0 + 31 * MIN).state).toBe("dropped");
    expect(sim.commsAt(T0 + 36 * MIN).state).toBe("ok");
    sim.advance(40 * 60);
    expect(sim.model.activeFaults()).toEqual([]);
  });
});

describe("fault schedules", () => {
  it("parses the command-line form", () => {
    expect(parseFaultSpec("mb-main:cooling@10", T0)).toEqual({ deviceId: "mb-main", kind: "cooling", atMs: T0 + 10 * MIN, durationMs: null });
    expect(parseFaultSpec("cr-fill:sensor-frozen/2@30+45", T0)).toEqual({
      deviceId: "cr-fill",
      kind: "sensor-frozen",
      atMs: T0 + 30 * MIN,
      durationMs: 45 * MIN,
      stage: 1,
    });
    expect(parseFaultSpec("hr-bay:comms-drop@0.5", T0).durationMs).toBe(15 * MIN);
    expect(() => parseFaultSpec("hr-bay:meltdown@5", T0)).toThrow(/kind must be one of/);
    expect(() => parseFaultSpec("hr-bay cooling 5", T0)).toThrow(/expected/);
  });

  it("plans about the asked number of demo incidents a day, the same for overlapping windows", () => {
    const devices = [
      { deviceId: "a", oilPump: true },
      { deviceId: "b", oilPump: false },
      { deviceId: "c", oilPump: true },
    ];
    const days = 200;
    const all = demoIncidents("demo", devices, T0, T0 + days * 86_400_000, 2);
    expect(all.length / days).toBeGreaterThan(1.6);
    expect(all.length / days).toBeLessThan(2.4);
    expect(all.filter((f) => f.kind === "oil").every((f) => f.deviceId !== "b")).toBe(true);
    expect(new Set(all.map((f) => f.kind)).size).toBeGreaterThanOrEqual(7);
    const part = demoIncidents("demo", devices, T0 + 10 * 86_400_000, T0 + 20 * 86_400_000, 2);
    expect(part).toEqual(all.filter((f) => f.atMs >= T0 + 10 * 86_400_000 && f.atMs < T0 + 20 * 86_400_000));
    expect(demoIncidents("demo", devices, T0, T0 + 86_400_000, 0)).toEqual([]);
  });
});

describe("trip-code table", () => {
  it("has unique codes and keys within the message range", () => {
    expect(new Set(tripCodes.map((t) => t.code)).size).toBe(tripCodes.length);
    expect(new Set(tripCodes.map((t) => t.key)).size).toBe(tripCodes.length);
    for (const t of tripCodes) {
      expect(t.code).toBeGreaterThan(0);
      expect(t.code).toBeLessThanOrEqual(65_535);
      expect(t.label.length).toBeGreaterThan(3);
    }
    expect(tripCodeInfo(tripCode("oil-pressure-low"))?.category).toBe("pressure");
    expect(tripCodeInfo(4242)).toBeNull();
    expect(tripCodeInfo(null)).toBeNull();
  });
});
