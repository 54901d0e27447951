import type { DemoDevice } from "./devices";
import { specFor } from "./devices";
import { CompressorModel, type ModelCounters, type ModelEvent } from "./model/compressor";
import { type FaultSpec, isCommsFault } from "./model/faults";

/** How the gateway's link behaves: publishing, silently not publishing, or disconnected (the last will fires). */
export type CommsState = "ok" | "silent" | "dropped";

export type DeviceSimOptions = {
  seed: string;
  startMs: number;
  init?: Partial<ModelCounters>;
  faults?: readonly FaultSpec[];
  /** Longest model step, s: advance() splits longer spans so the start sequence and trips resolve finely. */
  maxStepS?: number;
  fixedAmbientC?: number;
  demand?: boolean;
};

/** One simulated gateway: the physical model plus the faults of its communication link. */
export class DeviceSim {
  readonly device: DemoDevice;
  readonly model: CompressorModel;
  private readonly comms: FaultSpec[] = [];
  private readonly maxStepS: number;
  private lastEventTs = -Infinity;

  constructor(device: DemoDevice, opts: DeviceSimOptions) {
    this.device = device;
    this.maxStepS = opts.maxStepS ?? 1;
    this.model = new CompressorModel(specFor(device), {
      seed: opts.seed,
      startMs: opts.startMs,
      ...(opts.init ? { init: opts.init } : {}),
      ...(opts.fixedAmbientC !== undefined ? { fixedAmbientC: opts.fixedAmbientC } : {}),
      ...(opts.demand !== undefined ? { demand: opts.demand } : {}),
    });
    if (opts.faults) this.addFaults(opts.faults);
  }

  get timeMs(): number {
    return this.model.timeMs;
  }

  addFaults(faults: readonly FaultSpec[]): void {
    const mine = faults.filter((f) => f.deviceId === this.device.deviceId);
    this.model.schedule(mine);
    for (const f of mine) if (isCommsFault(f.kind)) this.comms.push(f);
    this.comms.sort((a, b) => a.atMs - b.atMs);
  }

  /**
   * Advances the model by `dtS` seconds in steps of at most maxStepS. Event times are made strictly increasing
   * (two events in one millisecond would otherwise collide in a store keyed on device, time and kind).
   */
  advance(dtS: number): ModelEvent[] {
    const out: ModelEvent[] = [];
    let left = dtS;
    while (left > 1e-9) {
      const h = Math.min(left, this.maxStepS);
      for (const e of this.model.step(h)) {
        const ts = Math.max(e.ts, this.lastEventTs + 1);
        this.lastEventTs = ts;
        out.push(ts === e.ts ? e : { ...e, ts });
      }
      left -= h;
    }
    return out;
  }

  /** The comms fault in force at model time `ms`, if any. */
  commsAt(ms: number): { state: CommsState; fault: FaultSpec | null } {
    let found: FaultSpec | null = null;
    for (const f of this.comms) {
      if (f.atMs > ms) break;
      const end = f.durationMs === null ? Infinity : f.atMs + f.durationMs;
      if (ms < end) found = f;
    }
    if (!found) return { state: "ok", fault: null };
    return { state: found.kind === "comms-drop" ? "dropped" : "silent", fault: found };
  }
}
