import { describe, expect, it } from "vitest";
import { demoCompressors, demoModels, demoSites } from "@/db/demo-scenario";
import { demoModelLimits } from "@/db/demo-thresholds";
import { demoOpening } from "@/simulator/demo-opening";
import { DeviceSim } from "@/simulator/device-sim";
import type { DemoDevice } from "@/simulator/devices";

const devices: DemoDevice[] = demoCompressors.map((c, i) => {
  const model = demoModels.find((m) => m.name === c.model)!;
  const site = demoSites.find((s) => s.code === c.site)!;
  return {
    deviceId: c.deviceId,
    secret: "not-a-secret",
    siteCode: site.code,
    timeZone: site.timeZone,
    compressorId: i + 1,
    name: c.name,
    stages: model.stages,
    ratedDeliveryLpm: model.ratedDeliveryLpm,
    ratedPressureBar: model.ratedPressureBar,
    stopPressureBar: c.stopPressureBar,
    restartPressureBar: c.restartPressureBar,
    bankVolumeL: c.bankVolumeL,
    profile: site.profile,
  };
});

function run(device: DemoDevice, opening: NonNullable<ReturnType<typeof demoOpening>>, start: number, minutes: number) {
  const sim = new DeviceSim(device, { seed: "airkeep", startMs: start, init: opening.init.get(device.deviceId) ?? {}, faults: opening.faults, demand: false });
  const samples: { min: number; state: string; bank: number; finalC: number }[] = [];
  const trips: { min: number; code: number | null }[] = [];
  for (let s = 5; s <= minutes * 60; s += 5) {
    for (const e of sim.advance(5)) if (e.kind === "trip") trips.push({ min: (e.ts - start) / 60_000, code: e.tripCode });
    const r = sim.model.reading();
    samples.push({ min: s / 60, state: r.runState, bank: r.deliveryBar, finalC: r.stageC[device.stages - 1] ?? NaN });
  }
  return { samples, trips };
}

describe("the demo's opening", () => {
  const start = Date.UTC(2026, 11, 3, 9, 0);
  const opening = demoOpening(devices, start, "http://localhost:3000")!;

  it("starts one unit filling at once, with its bank below stop pressure for the first five minutes", () => {
    const filling = devices.find((d) => d.deviceId === "mb-main")!;
    const { samples } = run(filling, opening, start, 5);
    expect(samples.find((s) => s.min === 1)!.state).toBe("running");
    const at1 = samples.find((s) => s.min === 1)!.bank;
    const at5 = samples.find((s) => s.min === 5)!.bank;
    expect(at5).toBeGreaterThan(at1);
    expect(at5).toBeLessThan(filling.stopPressureBar);
  });

  it("walks the other unit through its final-stage warning and critical limits to the machine's own over-temperature trip", () => {
    const incident = devices.find((d) => d.deviceId === "hr-bay")!;
    const model = demoCompressors.find((c) => c.deviceId === "hr-bay")!.model;
    const limit = (priority: string) => demoModelLimits[model].find((l) => l.signal === "finalStageC" && l.priority === priority)!.value;
    const { samples, trips } = run(incident, opening, start, 14);
    const firstAbove = (c: number) => samples.find((s) => s.finalC > c)?.min ?? Infinity;
    expect(firstAbove(limit("warning"))).toBeLessThan(8);
    expect(firstAbove(limit("critical"))).toBeGreaterThan(firstAbove(limit("warning")));
    expect(firstAbove(limit("critical"))).toBeLessThan(10);
    // Trip code 110 is Airkeep's "final stage over-temperature" (shared/trip-codes.ts), after the critical limit.
    expect(trips[0]?.code).toBe(110);
    expect(trips[0]!.min).toBeGreaterThan(firstAbove(limit("critical")));
    expect(trips[0]!.min).toBeLessThan(13);
  });

  it("plays only with the demo fleet", () => {
    expect(demoOpening(devices.filter((d) => d.deviceId !== "hr-bay"), start, "x")).toBeNull();
  });
});
