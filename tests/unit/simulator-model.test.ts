import { describe, expect, it } from "vitest";
import { ATMOSPHERE_BAR, FREE_AIR_REFERENCE } from "@/shared/air";
import { LEMMON_R, lemmonDensity, lemmonZ } from "@/shared/air-lemmon";
import { CompressorModel, type CompressorSpec, type ModelEvent, type ModelReading } from "@/simulator/model/compressor";
import { planDay } from "@/simulator/model/demand";
import { localTime } from "@/simulator/model/local-time";

const fireMain: CompressorSpec = {
  deviceId: "t-fire-main",
  stages: 4,
  ratedDeliveryLpm: 450,
  ratedPressureBar: 420,
  stopPressureBar: 414,
  restartPressureBar: 370,
  bankVolumeL: 200,
  profile: "fire",
  timeZone: "Europe/London",
  oilPump: true,
};
const diveFill: CompressorSpec = {
  deviceId: "t-dive-fill",
  stages: 3,
  ratedDeliveryLpm: 250,
  ratedPressureBar: 330,
  stopPressureBar: 300,
  restartPressureBar: 260,
  bankVolumeL: 200,
  profile: "dive",
  timeZone: "Europe/Malta",
  oilPump: true,
};
const portable: CompressorSpec = {
  deviceId: "t-portable",
  stages: 3,
  ratedDeliveryLpm: 80,
  ratedPressureBar: 225,
  stopPressureBar: 200,
  restartPressureBar: 170,
  bankVolumeL: 50,
  profile: "fire",
  timeZone: "Europe/Oslo",
  oilPump: false,
};
const boatUnit: CompressorSpec = { ...portable, deviceId: "t-boat", bankVolumeL: 0, profile: "dive", timeZone: "Europe/Malta" };
const workshop: CompressorSpec = { ...diveFill, deviceId: "t-works", profile: "industrial", timeZone: "America/Chicago" };

const T0 = Date.UTC(2025, 5, 2, 0, 0, 0); // a Monday

type Sample = { t: number; events: ModelEvent[]; r: ModelReading; bank: number; trueC: number[]; hours: number };

function run(m: CompressorModel, seconds: number, stepS = 1, every = 1): Sample[] {
  const out: Sample[] = [];
  for (let i = 1; i * stepS <= seconds; i++) {
    const events = m.step(stepS);
    if (i % every === 0 || events.length > 0) {
      out.push({ t: m.timeMs, events, r: m.reading(), bank: m.bankBar, trueC: [...m.stageTemperaturesC], hours: m.counters.hourMeterH });
    }
  }
  return out;
}

describe("bank pressure control", () => {
  it("stops at the stop pressure and restarts at the restart pressure", () => {
    const m = new CompressorModel(diveFill, { seed: "cycle", startMs: T0 });
    const samples = run(m, 3 * 86_400, 1, 60);
    let starts = 0;
    let stops = 0;
    let prev: ModelEvent | null = null;
    for (const s of samples) {
      for (const e of s.events) {
        if (e.text === "Motor start" && prev?.text !== "Trip reset") {
          starts++;
          expect(s.bank).toBeLessThanOrEqual(diveFill.restartPressureBar);
          expect(s.bank).toBeGreaterThan(diveFill.restartPressureBar - 2);
        }
        if (e.text === "Stop pressure reached") {
          stops++;
          expect(s.bank).toBeGreaterThanOrEqual(diveFill.stopPressureBar);
          expect(s.bank).toBeLessThan(diveFill.stopPressureBar + 0.5);
        }
        prev = e;
      }
    }
    expect(starts).toBeGreaterThanOrEqual(3);
    expect(stops).toBeGreaterThanOrEqual(3);
    // afterwards only the plant-room temperature moves the bank pressure (a few bar at most)
    expect(Math.max(...samples.map((s) => s.bank))).toBeLessThan(diveFill.stopPressureBar + 5);
  });

  it("fills a known bank in the time a real-gas hand computation gives", () => {
    const spec = { ...fireMain, deviceId: "t-fill" };
    const m = new CompressorModel(spec, {
      seed: "fill",
      startMs: T0,
      demand: false,
      fixedAmbientC: 20,
      init: { bankBar: spec.restartPressureBar - 0.01 },
    });
    const samples = run(m, 3600, 1, 60);
    const evs = samples.flatMap((s) => s.events);
    const running = evs.find((e) => e.runState === "running")!;
    const full = evs.find((e) => e.text === "Stop pressure reached")!;
    const seconds = (full.ts - running.ts) / 1000;

    // By hand, with Z from Lemmon et al. (2000): n = V·ρ(p, T); free air at 1 bar(a) and 20 °C.
    const tK = 293.15;
    const bankMol = (pGauge: number) => lemmonDensity((pGauge + ATMOSPHERE_BAR) * 1e5, tK) * (spec.bankVolumeL / 1000);
    const pRef = FREE_AIR_REFERENCE.pBarAbs * 1e5;
    const molPerFreeLitre = (pRef * 1e-3) / (lemmonZ(pRef, tK) * LEMMON_R * tK);
    const freeLitres = (bankMol(spec.stopPressureBar) - bankMol(spec.restartPressureBar - 0.01)) / molPerFreeLitre;
    const expected = (freeLitres / spec.ratedDeliveryLpm) * 60;
    expect(expected).toBeGreaterThan(600);
    expect(Math.abs(seconds - expected)).toBeLessThan(3);
  });
});

describe("temperatures", () => {
  it("rise with a first-order lag while running, the final stage hottest, and decay slowly after the stop", () => {
    const m = new CompressorModel(fireMain, {
      seed: "lag",
      startMs: T0,
      demand: false,
      fixedAmbientC: 20,
      init: { bankBar: fireMain.restartPressureBar - 0.01 },
    });
    const s = run(m, 3600, 1, 1);
    const runIdx = s.findIndex((x) => x.events.some((e) => e.runState === "running"));
    const stopIdx = s.findIndex((x) => x.events.some((e) => e.text === "Stop pressure reached"));
    const last = fireMain.stages - 1;
    const atStop = s[stopIdx]!.trueC;
    const riseAtStop = atStop[last]! - 20;
    expect(riseAtStop).toBeGreaterThan(60);
    // one minute in: well short of where it ends up (τ = 4 min)
    expect(s[runIdx + 60]!.trueC[last]! - 20).toBeLessThan(0.35 * riseAtStop);
    // never jumps: at most a few kelvin a second
    for (let i = runIdx + 1; i < stopIdx; i++) expect(Math.abs(s[i]!.trueC[last]! - s[i - 1]!.trueC[last]!)).toBeLessThan(3);
    expect(atStop[last]!).toBeGreaterThan(atStop[0]!);
    // five minutes after the stop most of the heat is still there (τ ≈ 18 min)
    expect(s[stopIdx + 300]!.trueC[last]! - 20).toBeGreaterThan(0.6 * riseAtStop);
  });

  it("stay within plausible bounds through three days of normal use on every kind of machine", () => {
    const bad: string[] = [];
    for (const spec of [fireMain, diveFill, portable, boatUnit, workshop]) {
      const m = new CompressorModel(spec, { seed: "bounds", startMs: T0 });
      for (const x of run(m, 3 * 86_400, 5, 12)) {
        const r = x.r;
        const ok =
          r.stageC.every((c) => c !== null && c > -10 && c < 190) &&
          r.intakeC > -20 &&
          r.intakeC < 45 &&
          r.purifierC > r.intakeC - 3 &&
          r.purifierC < r.intakeC + 25 &&
          r.tripCode === null;
        if (!ok) bad.push(`${spec.deviceId} ${new Date(x.t).toISOString()} ${JSON.stringify(r)}`);
      }
    }
    expect(bad).toEqual([]);
  });
});

describe("counters and run states", () => {
  it("advances the hour meter only while the motor runs and counts every start", () => {
    const m = new CompressorModel(diveFill, { seed: "hours", startMs: T0 });
    let hours = m.counters.hourMeterH;
    let starts = m.counters.starts;
    let state = m.runState;
    let startEvents = 0;
    let runSeconds = 0;
    const bad: string[] = [];
    for (let i = 0; i < 3 * 17_280; i++) {
      const events = m.step(5);
      const dh = m.counters.hourMeterH - hours;
      const motorBefore = state === "running" || state === "starting";
      const motorAfter = m.runState === "running" || m.runState === "starting";
      // a whole step in one state: exactly the step while the motor runs, nothing otherwise
      if (events.length === 0 && Math.abs(dh - (motorBefore ? 5 / 3600 : 0)) > 1e-12) bad.push(`${i} ${state} ${dh}`);
      if (!motorBefore && !motorAfter && events.every((e) => e.runState !== "starting") && dh !== 0) bad.push(`${i} idle ${dh}`);
      startEvents += events.filter((e) => e.runState === "starting").length;
      runSeconds += dh * 3600;
      hours = m.counters.hourMeterH;
      state = m.runState;
    }
    expect(bad).toEqual([]);
    expect(m.counters.starts - starts).toBe(startEvents);
    expect(startEvents).toBeGreaterThan(3);
    expect(runSeconds).toBeGreaterThan(3600);
    starts = m.counters.starts;
  });

  it("reports oil pressure only on pump-lubricated machines, and only with the motor on", () => {
    const pump = new CompressorModel(diveFill, { seed: "oil", startMs: T0, init: { bankBar: 250 } });
    const splash = new CompressorModel(portable, { seed: "oil", startMs: T0 });
    let lastEventAt = -Infinity;
    for (const x of run(pump, 3600, 1, 10)) {
      if (x.events.length > 0) lastEventAt = x.t;
      // pressures settle within seconds of a start or stop
      if (x.t - lastEventAt < 5_000) continue;
      if (x.r.runState === "running") expect(x.r.oilBar!).toBeGreaterThan(2.5);
      if (x.r.runState === "standby") expect(x.r.oilBar!).toBeLessThan(0.2);
    }
    for (const x of run(splash, 600, 5, 10)) expect(x.r.oilBar).toBeNull();
  });

  it("shows the start sequence for a few seconds before running", () => {
    const m = new CompressorModel(fireMain, { seed: "start", startMs: T0, demand: false, init: { bankBar: 360 } });
    const evs = run(m, 60, 0.5, 1).flatMap((x) => x.events);
    const starting = evs.find((e) => e.runState === "starting")!;
    const running = evs.find((e) => e.runState === "running")!;
    expect((running.ts - starting.ts) / 1000).toBeGreaterThanOrEqual(5);
    expect((running.ts - starting.ts) / 1000).toBeLessThanOrEqual(12);
  });

  it("switches an industrial unit off outside working hours", () => {
    const m = new CompressorModel(workshop, { seed: "works", startMs: T0 });
    for (const x of run(m, 7 * 86_400, 60, 10)) {
      const lt = localTime(workshop.timeZone, x.t);
      const weekend = lt.weekday === 0 || lt.weekday === 6;
      if (weekend || lt.hour < 6 || lt.hour >= 19) expect(x.r.runState).toBe("stopped");
    }
  });

  it("runs a unit without a bank only while cylinders are on the whips", () => {
    const m = new CompressorModel(boatUnit, { seed: "boat", startMs: T0 });
    const samples = run(m, 3 * 86_400, 5, 60);
    const states = new Set(samples.map((x) => x.r.runState));
    expect(states.has("stopped")).toBe(true);
    expect(states.has("running")).toBe(true);
    const nightly = samples.filter((x) => localTime(boatUnit.timeZone, x.t).hour < 5);
    for (const x of nightly) expect(x.r.runState).toBe("stopped");
    expect(Math.max(...samples.map((x) => x.r.deliveryBar))).toBeLessThan(boatUnit.stopPressureBar + 10);
  });
});

describe("demand and determinism", () => {
  it("plans busier dive days at weekends and refills after fire call-outs", () => {
    const dayOf = (ms: number, tz: string) => localTime(tz, ms).day;
    let weekday = 0;
    let weekend = 0;
    for (let d = 0; d < 28; d++) {
      const day = dayOf(T0, diveFill.timeZone) + d;
      const n = planDay(diveFill, "plan", day).reduce((s, e) => s + (e.kind === "fill" ? e.cylinders.length : 0), 0);
      const wd = new Date(day * 86_400_000).getUTCDay();
      if (wd === 0 || wd === 6) weekend += n / 8;
      else weekday += n / 20;
    }
    expect(weekend).toBeGreaterThan(1.5 * weekday);
    const fire = Array.from({ length: 30 }, (_, d) => planDay(fireMain, "plan", dayOf(T0, fireMain.timeZone) + d)).flat();
    expect(fire.some((e) => e.kind === "fill" && e.label.startsWith("Refill after incident"))).toBe(true);
    for (const e of fire) if (e.kind === "fill") for (const c of e.cylinders) expect(c.targetBar).toBeLessThanOrEqual(fireMain.stopPressureBar - 5);
  });

  it("gives the same series for the same seed and a different one for another", () => {
    const series = (seed: string) => {
      const m = new CompressorModel(diveFill, { seed, startMs: T0 });
      m.schedule([{ deviceId: diveFill.deviceId, kind: "cooling", atMs: T0 + 8 * 3_600_000, durationMs: null }]);
      return run(m, 86_400, 5, 1).map((x) => [x.r, x.events]);
    };
    const a = series("same");
    expect(series("same")).toEqual(a);
    expect(series("other")).not.toEqual(a);
  });
});
