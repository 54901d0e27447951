import type { RunState } from "../../shared/telemetry";
import { tripCode, tripCodeLabel } from "../../shared/trip-codes";
import * as air from "./air";
import { Outdoor } from "./ambient";
import { planDay, type Cylinder, type DemandEvent, type FillBatch, type Profile } from "./demand";
import type { FaultKind, FaultSpec } from "./faults";
import { isCommsFault } from "./faults";
import { DAY_MS, localTime } from "./local-time";
import { Random } from "./random";

export type CompressorSpec = {
  deviceId: string;
  stages: number;
  ratedDeliveryLpm: number;
  ratedPressureBar: number;
  stopPressureBar: number;
  restartPressureBar: number;
  /** Storage bank water volume, litres; 0 = no bank, cylinders are filled straight from the compressor. */
  bankVolumeL: number;
  profile: Profile;
  timeZone: string;
  /** Pressure-lubricated crankcase with an oil pressure transmitter; splash-lubricated units report no oil pressure. */
  oilPump: boolean;
};

/** The counters a gateway keeps across restarts, plus the bank pressure it last saw. */
export type ModelCounters = { hourMeterH: number; starts: number; bankBar: number };

export type ModelOptions = {
  seed: string;
  /** Model start, ms since the epoch. */
  startMs: number;
  init?: Partial<ModelCounters>;
  /** Plan cylinder fills and airline use (default true). */
  demand?: boolean;
  /** Hold intake and plant-room temperature constant (no weather, no room heating). */
  fixedAmbientC?: number;
  /** Length of the motor start sequence, s. */
  startSeconds?: number;
  /** Technician's response to a trip, minutes [min, max]. */
  resetDelayMin?: [number, number];
};

export type ModelEvent = {
  ts: number;
  kind: "state" | "trip";
  runState: RunState;
  tripCode: number | null;
  text: string;
};

export type ModelReading = {
  runState: RunState;
  motorOn: boolean;
  deliveryBar: number;
  stageBar: number[];
  stageC: (number | null)[];
  oilBar: number | null;
  purifierC: number;
  intakeC: number;
  hourMeterH: number;
  starts: number;
  tripCode: number | null;
};

// Machine protective limits (invented for the simulated machines). The magnitudes they produce (stage outlets
// roughly 100–170 °C, oil 3–5 bar, a start of a few seconds) are typical of the trade, from memory, not a maker's data.
export const MACHINE_LIMITS = {
  finalStageTripC: 200,
  finalStageTripTwoStageC: 215,
  /** Backstop on earlier stages; the final stage normally trips first. */
  otherStageTripC: 260,
  oilTripBar: 1.0,
  oilGraceS: 15,
  tripConfirmS: 3,
  oilTripConfirmS: 5,
  overPressureFactor: 1.06,
} as const;

// Thermal and pressure time constants, s.
const TAU = {
  stageHeating: 240,
  stageCooling: 1100,
  oilWarm: 1500,
  oilCool: 3600,
  purifier: 1500,
  room: 2400,
  pressureRise: 4,
  finalRise: 15,
  pressureVent: 1.5,
  oilPressure: 0.8,
} as const;

/** Polytropic exponent term (n−1)/n for finned, fan-cooled cylinders; rises as the fan air is lost. */
const POLY_M = 0.14;
const POLY_M_HOT = 0.17;
const INTERCOOLER_EFFECTIVENESS = 0.9;
const INTERCOOLER_EFFECTIVENESS_NO_FAN = 0.6;
/** Extra heat on the final-stage head with no cooling air: the smallest, hottest cylinder relies on the fan most. */
const FINAL_STAGE_NO_FAN_K = 70;
const FRICTION_HEAT_K = 8;
const FINAL_STAGE_EXTRA_K = 12;
const PURIFIER_DROP_BAR = 1.5;
/** Pipework, purifier and fill manifold of a unit without a bank, litres. */
const MANIFOLD_L = 1.5;
/** A direct-fill unit is switched off this long after its last cylinder. */
const DIRECT_OFF_DELAY_MS = 3 * 60_000;

type ActiveFault = {
  spec: FaultSpec;
  rampMs: number;
  /** Cooling faults: the fan's own motor protection trips first, after this long running with the fault. */
  fanTripAfterS: number | null;
  runningWithFaultS: number;
  frozenC: number | null;
};

type Slot = { cyl: Cylinder | null; mol: number; targetMol: number; rate: number; elapsedS: number; waitS: number };
type ActiveFill = { batch: FillBatch; queue: Cylinder[]; slots: Slot[] };

// module-level copies: the step loop is hot and imported bindings may be accessor calls once transpiled
const ATMOSPHERE_BAR = air.ATMOSPHERE_BAR;
const AIR_R = air.AIR_R;
const MOL_PER_FREE_LITRE = air.MOL_PER_FREE_LITRE;
const molesInVessel = air.molesInVessel;
const vesselPressureBar = air.vesselPressureBar;

// first-order lag factors, memoised: the step length rarely changes, so each (h, τ) pair is computed once
let lagH = NaN;
const lagMemo = new Map<number, number>();
const lag = (h: number, tau: number) => {
  if (h !== lagH) {
    lagH = h;
    lagMemo.clear();
  }
  let f = lagMemo.get(tau);
  if (f === undefined) {
    f = 1 - Math.exp(-h / tau);
    lagMemo.set(tau, f);
  }
  return f;
};
const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
const POW10 = [1, 10, 100, 1000];
const round = (x: number, digits: 0 | 1 | 2 | 3) => Math.round(x * POW10[digits]!) / POW10[digits]!;

/**
 * One compressor with its storage bank: deterministic for a given seed, start time and sequence of steps.
 * Model time only moves through `step`.
 */
export class CompressorModel {
  readonly spec: CompressorSpec;
  private t: number;
  private state: RunState = "standby";
  private manualOn = true;
  private startElapsedS = 0;
  private runElapsedS = 0;
  private trip: number | null = null;
  private resetAtMs = Infinity;

  private bankMol: number;
  private readonly direct: boolean;
  private connectedL = 0;
  private directOffAtMs = Infinity;
  private bankAt = NaN;
  private bankAtMol = NaN;
  private bankAtL = NaN;
  private bankBarCached = 0;
  private readonly stageP: number[];
  private readonly stageT: number[];
  private oilTC: number;
  private oilP = 0;
  private purifierTC: number;
  private roomHeatK = 0;
  private hours: number;
  private startCount: number;

  private overTempS = 0;
  private otherOverTempS = 0;
  private oilLowS = 0;
  private sensorBadS = 0;

  private readonly scheduled: FaultSpec[] = [];
  private readonly faults: ActiveFault[] = [];

  private readonly demandOn: boolean;
  private plannedDay: number;
  private plannedUntilMs = -Infinity;
  private readonly pending: DemandEvent[] = [];
  private readonly fills: ActiveFill[] = [];
  private readonly airline: { endMs: number; freeAirLpm: number }[] = [];

  private readonly outdoor: Outdoor;
  private outdoorAt = NaN;
  private outdoorC = 0;
  private readonly noise: Random;
  private readonly nominalAbs: number[];
  private readonly startSeconds: number;
  private readonly resetDelayMin: [number, number];
  private readonly seed: string;
  private readonly fixedAmbientC: number | undefined;
  private readonly events: ModelEvent[] = [];
  private readonly lastC: (number | null)[];

  constructor(spec: CompressorSpec, options: ModelOptions) {
    if (spec.stages < 1 || spec.stages > 4) throw new Error(`${spec.deviceId}: stages must be 1–4`);
    if (!(spec.restartPressureBar < spec.stopPressureBar)) throw new Error(`${spec.deviceId}: restart pressure must be below stop pressure`);
    this.spec = spec;
    this.seed = options.seed;
    this.t = options.startMs;
    this.fixedAmbientC = options.fixedAmbientC;
    this.demandOn = options.demand ?? true;
    this.startSeconds = options.startSeconds ?? 5 + spec.stages;
    this.resetDelayMin = options.resetDelayMin ?? [20, 110];
    this.outdoor = new Outdoor(spec.timeZone, `${options.seed}:${spec.timeZone}`);
    this.noise = new Random(`${options.seed}:${spec.deviceId}:noise`);

    const init = new Random(`${options.seed}:${spec.deviceId}:init`);
    const hours = round(init.uniform(900, 7500), 1);
    this.hours = options.init?.hourMeterH ?? hours;
    this.startCount = options.init?.starts ?? Math.round(hours * init.uniform(2.2, 4.5));
    const bankBar = options.init?.bankBar ?? init.uniform(spec.restartPressureBar + 5, spec.stopPressureBar);

    const ratio = ((spec.ratedPressureBar + ATMOSPHERE_BAR) / ATMOSPHERE_BAR) ** (1 / spec.stages);
    this.nominalAbs = Array.from({ length: spec.stages }, (_, k) => ATMOSPHERE_BAR * ratio ** (k + 1));

    this.direct = spec.bankVolumeL <= 0;
    const plant = this.plantC();
    this.bankMol = this.direct
      ? molesInVessel(MANIFOLD_L, 0, plant)
      : molesInVessel(spec.bankVolumeL, clamp(bankBar, 0, spec.ratedPressureBar * 1.05), plant);
    this.stageP = new Array<number>(spec.stages).fill(0);
    this.stageT = new Array<number>(spec.stages).fill(plant);
    this.lastC = new Array<number | null>(spec.stages).fill(plant);
    this.oilTC = plant;
    this.purifierTC = plant;

    this.plannedDay = localTime(spec.timeZone, this.t).day - 2;
    this.planThrough(this.t);
    if (spec.profile === "industrial") this.manualOn = this.switchStateAt(this.t);
    if (this.direct) this.manualOn = false;
    // events that began before the start are history, not work to do
    for (let i = this.pending.length - 1; i >= 0; i--) if (this.pending[i]!.startMs < this.t) this.pending.splice(i, 1);
    if (!this.manualOn) this.state = "stopped";
  }

  get timeMs(): number {
    return this.t;
  }

  get runState(): RunState {
    return this.state;
  }

  get tripCode(): number | null {
    return this.trip;
  }

  /** Delivery pressure: the bank, or for a unit without one, the manifold and the cylinders open to it. */
  get bankBar(): number {
    const volumeL = this.volumeL();
    if (this.bankAt !== this.t || this.bankAtMol !== this.bankMol || this.bankAtL !== volumeL) {
      this.bankAt = this.t;
      this.bankAtMol = this.bankMol;
      this.bankAtL = volumeL;
      this.bankBarCached = vesselPressureBar(volumeL, this.bankMol, this.plantC());
    }
    return this.bankBarCached;
  }

  private volumeL(): number {
    return this.direct ? MANIFOLD_L + this.connectedL : this.spec.bankVolumeL;
  }

  get counters(): ModelCounters {
    return { hourMeterH: this.hours, starts: this.startCount, bankBar: this.bankBar };
  }

  /** True stage outlet temperatures, °C (before any sensor fault). */
  get stageTemperaturesC(): readonly number[] {
    return this.stageT;
  }

  get oilPressureBar(): number {
    return this.oilP;
  }

  /** Delivered free air at this moment, l/min (0 when not running). */
  get deliveryLpm(): number {
    return this.state === "running" ? this.spec.ratedDeliveryLpm * this.valveFactor() : 0;
  }

  activeFaults(): FaultKind[] {
    return this.faults.map((f) => f.spec.kind);
  }

  /** Queues physical faults for this machine; communication faults are ignored here. */
  schedule(faults: readonly FaultSpec[]): void {
    for (const f of faults) if (f.deviceId === this.spec.deviceId && !isCommsFault(f.kind)) this.scheduled.push(f);
    this.scheduled.sort((a, b) => a.atMs - b.atMs);
  }

  /** Advances model time by `dtS` seconds; returns the state changes and trips that happened, in order. */
  step(dtS: number): ModelEvent[] {
    const end = this.t + dtS * 1000;
    this.planThrough(end);
    while (this.t < end) {
      const next = Math.min(end, this.nextBoundary());
      const h = (next - this.t) / 1000;
      if (h > 0) this.integrate(h);
      this.t = next;
      this.atBoundary();
    }
    return this.events.splice(0);
  }

  /** What the gateway would read from its sensors now. Draws sensor noise, so call it once per published message. */
  reading(): ModelReading {
    const n = this.noise;
    const motorOn = this.state === "starting" || this.state === "running";
    const stageC: (number | null)[] = this.stageT.map((c, k) => {
      const fault = this.sensorFault(k);
      if (fault?.spec.kind === "sensor-null") return null;
      if (fault?.spec.kind === "sensor-range") return -49.0;
      if (fault?.spec.kind === "sensor-frozen") return fault.frozenC ?? this.lastC[k] ?? null;
      const v = round(clamp(c + 0.25 * n.noise(), -49.9, 349.9), 1);
      this.lastC[k] = v;
      return v;
    });
    return {
      runState: this.state,
      motorOn,
      deliveryBar: round(Math.max(0, this.bankBar + 0.2 * n.noise()), 1),
      stageBar: this.stageP.map((p) => round(Math.max(0, p * (1 + 0.004 * n.noise()) + 0.02 * n.noise()), 1)),
      stageC,
      oilBar: this.spec.oilPump ? round(clamp(this.oilP + (motorOn ? 0.03 * n.noise() : 0), 0, 29), 2) : null,
      purifierC: round(this.purifierTC + 0.15 * n.noise(), 1),
      intakeC: round(this.plantC() + 0.15 * n.noise(), 1),
      hourMeterH: round(this.hours, 3),
      starts: this.startCount,
      tripCode: this.trip,
    };
  }

  // ——— time structure ———

  private nextBoundary(): number {
    let next = Infinity;
    if (this.state === "starting") next = this.t + (this.startSeconds - this.startElapsedS) * 1000;
    if (this.state === "tripped") next = Math.min(next, this.resetAtMs);
    const p = this.pending[0];
    if (p) next = Math.min(next, p.startMs);
    const s = this.scheduled[0];
    if (s) next = Math.min(next, s.atMs);
    for (const f of this.faults) if (f.spec.durationMs !== null) next = Math.min(next, f.spec.atMs + f.spec.durationMs);
    for (const a of this.airline) next = Math.min(next, a.endMs);
    next = Math.min(next, this.directOffAtMs);
    return Math.max(next, this.t);
  }

  private planThrough(untilMs: number): void {
    if (!this.demandOn && this.spec.profile !== "industrial") return;
    if (untilMs < this.plannedUntilMs) return;
    this.plannedUntilMs = untilMs + 6 * 3_600_000;
    const lastDay = localTime(this.spec.timeZone, untilMs).day + 1;
    while (this.plannedDay < lastDay) {
      this.plannedDay++;
      const plan = planDay(this.spec, this.seed, this.plannedDay);
      for (const e of plan) if (this.demandOn || e.kind === "switch") this.pending.push(e);
    }
    this.pending.sort((a, b) => a.startMs - b.startMs);
  }

  private switchStateAt(ms: number): boolean {
    let on = false;
    for (let day = localTime(this.spec.timeZone, ms).day - 3; day <= localTime(this.spec.timeZone, ms).day; day++) {
      for (const e of planDay(this.spec, this.seed, day)) if (e.kind === "switch" && e.startMs <= ms) on = e.on;
    }
    return on;
  }

  private atBoundary(): void {
    const t = this.t;
    while (this.pending.length > 0 && this.pending[0]!.startMs <= t) {
      const e = this.pending.shift()!;
      if (e.kind === "switch") this.operatorSwitch(e.on);
      else if (e.kind === "airline") this.airline.push({ endMs: e.endMs, freeAirLpm: e.freeAirLpm });
      else {
        this.fills.push({ batch: e, queue: [...e.cylinders], slots: Array.from({ length: e.parallel }, () => emptySlot()) });
        if (this.direct) {
          this.directOffAtMs = Infinity;
          this.operatorSwitch(true);
        }
      }
    }
    if (this.direct && this.manualOn) {
      if (this.fills.length === 0 && this.directOffAtMs === Infinity) this.directOffAtMs = t + DIRECT_OFF_DELAY_MS;
      if (t >= this.directOffAtMs) {
        this.directOffAtMs = Infinity;
        this.operatorSwitch(false);
        // whips and manifold are vented when the operator shuts down
        this.bankMol = molesInVessel(MANIFOLD_L, 0, this.plantC());
      }
    }
    for (let i = this.airline.length - 1; i >= 0; i--) if (this.airline[i]!.endMs <= t) this.airline.splice(i, 1);
    while (this.scheduled.length > 0 && this.scheduled[0]!.atMs <= t) this.activate(this.scheduled.shift()!);
    for (let i = this.faults.length - 1; i >= 0; i--) {
      const f = this.faults[i]!;
      if (f.spec.durationMs !== null && f.spec.atMs + f.spec.durationMs <= t) this.faults.splice(i, 1);
    }
    this.transitions();
  }

  private activate(spec: FaultSpec): void {
    const r = new Random(`${this.seed}:${spec.deviceId}:fault:${spec.kind}:${spec.atMs}`);
    let rampMs = 0;
    let fanTripAfterS: number | null = null;
    // The draws happen whether or not the spec fixes the outcome, so the seed's later draws stay the same.
    if (spec.kind === "cooling") {
      rampMs = spec.rampMs ?? r.uniform(6, 14) * 60_000;
      const fanTrip = r.chance(0.25);
      const fanTripS = fanTrip ? r.uniform(60, 240) : null;
      if (spec.fanTrip ?? fanTrip) fanTripAfterS = fanTripS ?? 120;
    } else if (spec.kind === "oil") {
      rampMs = spec.rampMs ?? r.uniform(5, 10) * 60_000;
    } else if (spec.kind === "worn-valves") {
      rampMs = Math.min(2 * DAY_MS, (spec.durationMs ?? 6 * DAY_MS) / 3);
    }
    const stage = spec.stage;
    const sensorStage = clamp(stage ?? this.spec.stages - 1, 0, this.spec.stages - 1);
    const frozenC = spec.kind === "sensor-frozen" ? (this.lastC[sensorStage] ?? round(this.stageT[sensorStage]!, 1)) : null;
    this.faults.push({ spec, rampMs, fanTripAfterS, runningWithFaultS: 0, frozenC });
  }

  private severity(kind: FaultKind): number {
    let s = 0;
    for (const f of this.faults) {
      if (f.spec.kind !== kind) continue;
      s = Math.max(s, f.rampMs <= 0 ? 1 : clamp((this.t - f.spec.atMs) / f.rampMs, 0, 1));
    }
    return s;
  }

  private sensorFault(stage: number): ActiveFault | null {
    for (const f of this.faults) {
      if (!f.spec.kind.startsWith("sensor-")) continue;
      if (clamp(f.spec.stage ?? this.spec.stages - 1, 0, this.spec.stages - 1) === stage) return f;
    }
    return null;
  }

  private brokenSensor(): boolean {
    return this.faults.some((f) => f.spec.kind === "sensor-null" || f.spec.kind === "sensor-range");
  }

  private wornStage(): number {
    const f = this.faults.find((x) => x.spec.kind === "worn-valves");
    return clamp(f?.spec.stage ?? Math.min(1, this.spec.stages - 1), 0, this.spec.stages - 1);
  }

  private valveFactor(): number {
    return 1 - 0.3 * this.severity("worn-valves");
  }

  // ——— physics over one segment of h seconds ———

  private plantC(): number {
    if (this.fixedAmbientC !== undefined) return this.fixedAmbientC;
    if (this.outdoorAt !== this.t) {
      this.outdoorAt = this.t;
      this.outdoorC = this.outdoor.temperatureC(this.t);
    }
    // plant room: partly buffered from the weather, warmed by the running machine
    return 0.55 * this.outdoorC + 0.45 * 17 + this.roomHeatK;
  }

  private integrate(h: number): void {
    const spec = this.spec;
    const n = spec.stages;
    const plant = this.plantC();
    const motorOn = this.state === "starting" || this.state === "running";
    const loaded = this.state === "running";
    const pBank = this.bankBar;

    // bank mass balance
    let inflow = 0;
    if (loaded) inflow = ((spec.ratedDeliveryLpm * this.valveFactor()) / 60) * MOL_PER_FREE_LITRE;
    let outflow = 0;
    for (const a of this.airline) if (pBank > 12) outflow += (a.freeAirLpm / 60) * MOL_PER_FREE_LITRE;
    let drawn = outflow * h;
    for (let i = this.fills.length - 1; i >= 0; i--) {
      const fill = this.fills[i]!;
      if (this.direct) this.runDirectFill(fill, h, plant);
      else drawn += this.runFill(fill, h, pBank, plant);
      if (fill.queue.length === 0 && fill.slots.every((s) => s.cyl === null && s.waitS <= 0)) this.fills.splice(i, 1);
    }
    // never below atmospheric (ideal gas is exact enough at 1 atm)
    const floor = ((ATMOSPHERE_BAR * 1e5) / (AIR_R * (plant + 273.15))) * (this.volumeL() / 1000);
    this.bankMol = Math.max(floor, this.bankMol + inflow * h - drawn);

    // stage pressures: loaded stages settle on their interstage pressures, unloaded stages vent through the drains
    const bankAbs = pBank + ATMOSPHERE_BAR;
    const ratedAbs = spec.ratedPressureBar + ATMOSPHERE_BAR;
    const worn = this.severity("worn-valves");
    const w = this.wornStage();
    for (let k = 0; k < n; k++) {
      let target = 0;
      if (loaded) {
        if (k === n - 1) target = pBank + PURIFIER_DROP_BAR;
        else target = this.nominalAbs[k]! * (0.8 + 0.2 * (bankAbs / ratedAbs)) - ATMOSPHERE_BAR;
        if (worn > 0 && k === w - 1) target *= 1 + 0.2 * worn;
        if (worn > 0 && k === w && k < n - 1) target *= 1 - 0.08 * worn;
      }
      const tau = target > this.stageP[k]! ? (k === n - 1 ? TAU.finalRise : TAU.pressureRise) : TAU.pressureVent;
      this.stageP[k]! += (target - this.stageP[k]!) * lag(h, tau);
    }

    // stage outlet temperatures: polytropic heating from the stage's pressure ratio, intercooled inlet, first-order lag
    const cooling = this.severity("cooling");
    const m = POLY_M + (POLY_M_HOT - POLY_M) * cooling;
    const eps = INTERCOOLER_EFFECTIVENESS - (INTERCOOLER_EFFECTIVENESS - INTERCOOLER_EFFECTIVENESS_NO_FAN) * cooling;
    for (let k = 0; k < n; k++) {
      let ss = plant;
      let tau: number = TAU.stageCooling;
      if (motorOn) {
        const inC = k === 0 ? plant : plant + (1 - eps) * (this.stageT[k - 1]! - plant);
        const pIn = k === 0 ? ATMOSPHERE_BAR : this.stageP[k - 1]! + ATMOSPHERE_BAR;
        const ratio = Math.max(1, (this.stageP[k]! + ATMOSPHERE_BAR) / pIn);
        ss = (inC + 273.15) * ratio ** m - 273.15 + FRICTION_HEAT_K;
        if (loaded && k === n - 1) ss += FINAL_STAGE_EXTRA_K;
        if (k === n - 1) ss += FINAL_STAGE_NO_FAN_K * cooling;
        if (worn > 0 && k === w) ss += 18 * worn;
        tau = TAU.stageHeating;
      }
      this.stageT[k]! += (ss - this.stageT[k]!) * lag(h, tau);
    }

    // lubrication
    this.oilTC += ((motorOn ? plant + 38 : plant) - this.oilTC) * lag(h, motorOn ? TAU.oilWarm : TAU.oilCool);
    let oilTarget = 0;
    if (motorOn && spec.oilPump) {
      const build = this.state === "starting" ? 1 - Math.exp(-(this.startElapsedS + h) / 1.2) : 1;
      oilTarget = (2.9 + 2.4 * Math.exp(-(this.oilTC - 15) / 25)) * (1 - 0.88 * this.severity("oil")) * build;
    }
    this.oilP += (oilTarget - this.oilP) * lag(h, TAU.oilPressure);

    const finalC = this.stageT[n - 1]!;
    const purTarget = motorOn ? plant + 5 + 0.05 * (finalC - plant) : plant;
    this.purifierTC += (purTarget - this.purifierTC) * lag(h, TAU.purifier);
    if (this.fixedAmbientC === undefined) this.roomHeatK += ((motorOn ? 4.5 : 0) - this.roomHeatK) * lag(h, TAU.room);

    if (motorOn) this.hours += h / 3600;
    if (this.state === "starting") this.startElapsedS += h;
    if (loaded) this.runElapsedS += h;

    this.protectiveTimers(h, loaded, motorOn);
  }

  /** Moves air from the bank into the batch's cylinders; returns moles drawn. */
  private runFill(fill: ActiveFill, h: number, pBank: number, plant: number): number {
    let drawn = 0;
    for (const slot of fill.slots) {
      if (slot.waitS > 0) {
        slot.waitS -= h;
        continue;
      }
      if (!slot.cyl) {
        const cyl = fill.queue.shift();
        if (!cyl) continue;
        slot.cyl = cyl;
        slot.mol = molesInVessel(cyl.volumeL, cyl.residualBar, plant);
        slot.targetMol = molesInVessel(cyl.volumeL, cyl.targetBar, plant);
        slot.rate = (slot.targetMol - slot.mol) / fill.batch.fillSeconds;
        slot.elapsedS = 0;
      }
      const cyl = slot.cyl;
      const pCyl = vesselPressureBar(cyl.volumeL, slot.mol, plant);
      // flow falls off as bank and cylinder pressures approach each other
      const dm = Math.min(slot.rate * clamp((pBank - pCyl) / 15, 0, 1) * h, slot.targetMol - slot.mol);
      slot.mol += dm;
      drawn += dm;
      slot.elapsedS += h;
      if (slot.targetMol - slot.mol < 1e-6 || slot.elapsedS > 4 * fill.batch.fillSeconds) {
        slot.cyl = null;
        slot.waitS = fill.batch.changeoverSeconds;
      }
    }
    return drawn;
  }

  /**
   * Without a bank, open cylinders share one pressure with the manifold and fill together from the compressor.
   * Cylinders join the connected volume with their residual air and leave with their share when full.
   */
  private runDirectFill(fill: ActiveFill, h: number, plant: number): void {
    const p = this.bankBar;
    for (const slot of fill.slots) {
      if (slot.waitS > 0) {
        slot.waitS -= h;
        continue;
      }
      if (!slot.cyl) {
        const cyl = fill.queue.shift();
        if (!cyl) continue;
        slot.cyl = cyl;
        slot.elapsedS = 0;
        this.bankMol += molesInVessel(cyl.volumeL, cyl.residualBar, plant);
        this.connectedL += cyl.volumeL;
        continue;
      }
      slot.elapsedS += h;
      if (p >= slot.cyl.targetBar - 0.5 || slot.elapsedS > 6 * 3600) {
        // at one pressure and temperature the moles divide in proportion to volume
        this.bankMol -= this.bankMol * (slot.cyl.volumeL / this.volumeL());
        this.connectedL -= slot.cyl.volumeL;
        slot.cyl = null;
        slot.waitS = fill.batch.changeoverSeconds;
      }
    }
  }

  private protectiveTimers(h: number, loaded: boolean, motorOn: boolean): void {
    const n = this.spec.stages;
    const finalLimit = n <= 2 ? MACHINE_LIMITS.finalStageTripTwoStageC : MACHINE_LIMITS.finalStageTripC;
    this.overTempS = motorOn && this.stageT[n - 1]! > finalLimit ? this.overTempS + h : 0;
    const other = this.stageT.some((c, k) => k < n - 1 && c > MACHINE_LIMITS.otherStageTripC);
    this.otherOverTempS = motorOn && other ? this.otherOverTempS + h : 0;
    const oilLow = this.spec.oilPump && loaded && this.runElapsedS > MACHINE_LIMITS.oilGraceS && this.oilP < MACHINE_LIMITS.oilTripBar;
    this.oilLowS = oilLow ? this.oilLowS + h : 0;
    this.sensorBadS = motorOn && this.brokenSensor() ? this.sensorBadS + h : 0;
    for (const f of this.faults) if (f.spec.kind === "cooling" && motorOn) f.runningWithFaultS += h;
  }

  // ——— run-state machine ———

  private transitions(): void {
    const spec = this.spec;
    switch (this.state) {
      case "tripped":
        if (this.t >= this.resetAtMs) {
          // the technician repairs what caused the trip before resetting
          for (let i = this.faults.length - 1; i >= 0; i--) if (this.faults[i]!.spec.durationMs === null) this.faults.splice(i, 1);
          this.trip = null;
          this.resetAtMs = Infinity;
          this.setState(this.manualOn ? "standby" : "stopped", "Trip reset");
        }
        break;
      case "starting":
        if (this.checkTrips()) break;
        if (this.startElapsedS >= this.startSeconds - 1e-9) {
          this.runElapsedS = 0;
          this.setState("running", this.direct ? "Running, filling cylinders" : "Running, filling bank");
        }
        break;
      case "running":
        if (this.checkTrips()) break;
        if (this.bankBar >= spec.stopPressureBar) this.setState("standby", "Stop pressure reached");
        break;
      default:
        break;
    }
    if (this.state === "standby" && this.manualOn && this.bankBar <= spec.restartPressureBar) {
      this.startCount++;
      this.startElapsedS = 0;
      this.setState("starting", "Motor start");
      if (this.brokenSensor()) this.tripNow(tripCode("temperature-sensor"));
    }
  }

  private checkTrips(): boolean {
    const cooling = this.faults.find((f) => f.spec.kind === "cooling" && f.fanTripAfterS !== null);
    if (cooling && cooling.runningWithFaultS >= cooling.fanTripAfterS!) return this.tripNow(tripCode("cooling-fan"));
    if (this.sensorBadS >= MACHINE_LIMITS.tripConfirmS) return this.tripNow(tripCode("temperature-sensor"));
    if (this.overTempS >= MACHINE_LIMITS.tripConfirmS) return this.tripNow(tripCode("final-stage-overtemp"));
    if (this.otherOverTempS >= MACHINE_LIMITS.tripConfirmS) return this.tripNow(tripCode("stage-overtemp"));
    if (this.oilLowS >= MACHINE_LIMITS.oilTripConfirmS) return this.tripNow(tripCode("oil-pressure-low"));
    if (this.bankBar > this.spec.ratedPressureBar * MACHINE_LIMITS.overPressureFactor) {
      return this.tripNow(tripCode("delivery-overpressure"));
    }
    return false;
  }

  private tripNow(code: number): true {
    const r = new Random(`${this.seed}:${this.spec.deviceId}:reset:${Math.round(this.t)}`);
    this.trip = code;
    this.resetAtMs = this.t + r.uniform(this.resetDelayMin[0], this.resetDelayMin[1]) * 60_000;
    this.overTempS = this.otherOverTempS = this.oilLowS = this.sensorBadS = 0;
    this.state = "tripped";
    this.events.push({ ts: Math.round(this.t), kind: "trip", runState: "tripped", tripCode: code, text: `Trip: ${tripCodeLabel(code)}` });
    return true;
  }

  private operatorSwitch(on: boolean): void {
    this.manualOn = on;
    if (!on && (this.state === "standby" || this.state === "starting" || this.state === "running")) {
      this.setState("stopped", "Switched off by operator");
    } else if (on && this.state === "stopped") {
      this.setState("standby", "Switched to automatic");
    }
  }

  private setState(next: RunState, text: string): void {
    if (next === this.state) return;
    this.state = next;
    this.events.push({ ts: Math.round(this.t), kind: "state", runState: next, tripCode: null, text });
  }
}

function emptySlot(): Slot {
  return { cyl: null, mol: 0, targetMol: 0, rate: 0, elapsedS: 0, waitS: 0 };
}

/** Splash-lubricated small machines have no oil pump; the demo seed may say otherwise per device. */
export function defaultOilPump(stages: number, ratedDeliveryLpm: number): boolean {
  return stages >= 3 && ratedDeliveryLpm >= 250;
}
