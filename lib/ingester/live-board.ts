import type { CompressorStateInput } from "@/db/telemetry-state";
import type { CompressorStateRow } from "@/db/schema";
import type { LiveCompressor } from "@/shared/live";
import { FILL_RATE_MAX_REL_ERROR, FILL_RATE_MIN_SPAN_MS, FILL_RATE_WINDOW_MS } from "@/shared/board";
import { type DeviceEvent, type ReadingInput, runStateCode, runStateFromCode } from "@/shared/telemetry";
import { FillRateWindow } from "./fill-rate";

const newFillWindow = () => new FillRateWindow(FILL_RATE_WINDOW_MS);

type Entry = { row: CompressorStateInput; fill: FillRateWindow; dirty: boolean };

function emptyRow(compressorId: number, now: number): CompressorStateInput {
  return {
    compressorId,
    online: false,
    lastSeenAt: null,
    receivedAt: null,
    ts: null,
    seq: null,
    runState: null,
    motorOn: null,
    deliveryBar: null,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: null,
    stage2C: null,
    stage3C: null,
    stage4C: null,
    oilBar: null,
    purifierC: null,
    intakeC: null,
    hourMeterH: null,
    starts: null,
    tripCode: null,
    fillRateBarPerMin: null,
    updatedAt: now,
  };
}

function trimNulls(values: (number | null)[]): (number | null)[] {
  let n = values.length;
  while (n > 0 && values[n - 1] === null) n--;
  return values.slice(0, n);
}

const round = (x: number | null, digits: number) => (x === null ? null : Math.round(x * 10 ** digits) / 10 ** digits);

export function toLive(row: CompressorStateInput): LiveCompressor {
  return {
    compressorId: row.compressorId,
    online: row.online,
    receivedAt: row.receivedAt,
    ts: row.ts,
    runState: row.runState === null ? null : runStateFromCode(row.runState),
    motorOn: row.motorOn === null ? null : row.motorOn === 1,
    deliveryBar: row.deliveryBar,
    stageBar: trimNulls([row.stage1Bar, row.stage2Bar, row.stage3Bar, row.stage4Bar]),
    stageC: trimNulls([row.stage1C, row.stage2C, row.stage3C, row.stage4C]),
    oilBar: row.oilBar,
    purifierC: row.purifierC,
    intakeC: row.intakeC,
    hourMeterH: row.hourMeterH,
    starts: row.starts,
    tripCode: row.tripCode,
    fillRateBarPerMin: round(row.fillRateBarPerMin, 2),
  };
}

/** What the board shows for each compressor: its last reading, comms state and fill rate. */
export class LiveBoard {
  private readonly entries = new Map<number, Entry>();

  constructor(states: readonly CompressorStateRow[]) {
    for (const s of states) this.entries.set(s.compressorId, { row: { ...s }, fill: newFillWindow(), dirty: false });
  }

  private entry(compressorId: number, now: number): Entry {
    let e = this.entries.get(compressorId);
    if (!e) {
      e = { row: emptyRow(compressorId, now), fill: newFillWindow(), dirty: true };
      this.entries.set(compressorId, e);
    }
    return e;
  }

  has(compressorId: number): boolean {
    return this.entries.has(compressorId);
  }

  /** Folds in a reading; false when it is not newer than what is shown (a replay or a late one). */
  applyReading(r: ReadingInput, receivedAt: number): boolean {
    const e = this.entry(r.compressorId, receivedAt);
    const row = e.row;
    if (row.ts !== null && r.ts <= row.ts) return false;
    const running = r.runState === runStateCode.running && r.motorOn === 1;
    e.fill.add(r.ts, r.deliveryBar, running);
    Object.assign(row, {
      receivedAt,
      ts: r.ts,
      seq: r.seq,
      runState: r.runState,
      motorOn: r.motorOn,
      deliveryBar: r.deliveryBar,
      stage1Bar: r.stage1Bar,
      stage2Bar: r.stage2Bar,
      stage3Bar: r.stage3Bar,
      stage4Bar: r.stage4Bar,
      stage1C: r.stage1C,
      stage2C: r.stage2C,
      stage3C: r.stage3C,
      stage4C: r.stage4C,
      oilBar: r.oilBar,
      purifierC: r.purifierC,
      intakeC: r.intakeC,
      hourMeterH: r.hourMeterH,
      starts: r.starts,
      tripCode: r.tripCode,
      fillRateBarPerMin: running ? e.fill.steadySlopeBarPerMin(FILL_RATE_MIN_SPAN_MS, FILL_RATE_MAX_REL_ERROR) : null,
      updatedAt: receivedAt,
    });
    e.dirty = true;
    return true;
  }

  /** A state change or trip reported on the event channel shows at once, ahead of the next reading. */
  applyEvent(compressorId: number, ev: DeviceEvent, receivedAt: number): boolean {
    const e = this.entry(compressorId, receivedAt);
    if (e.row.ts !== null && ev.ts < e.row.ts) return false;
    e.row.runState = runStateCode[ev.runState];
    if (ev.kind === "trip" || ev.tripCode !== undefined) e.row.tripCode = ev.tripCode ?? null;
    if (ev.runState !== "running") {
      e.row.fillRateBarPerMin = null;
      e.fill.add(ev.ts, null, false);
    }
    e.row.updatedAt = receivedAt;
    e.dirty = true;
    return true;
  }

  seen(compressorId: number, now: number): void {
    const e = this.entry(compressorId, now);
    e.row.lastSeenAt = now;
    e.dirty = true;
  }

  /** Returns true when the flag changed. */
  setOnline(compressorId: number, online: boolean, now: number): boolean {
    const e = this.entry(compressorId, now);
    if (e.row.online === online) return false;
    e.row.online = online;
    e.row.updatedAt = now;
    if (!online) {
      e.row.fillRateBarPerMin = null;
      e.fill.add(now, null, false);
    }
    e.dirty = true;
    return true;
  }

  row(compressorId: number): CompressorStateInput | undefined {
    return this.entries.get(compressorId)?.row;
  }

  live(compressorId: number, now = Date.now()): LiveCompressor {
    return toLive(this.entries.get(compressorId)?.row ?? emptyRow(compressorId, now));
  }

  rows(): CompressorStateInput[] {
    return [...this.entries.values()].map((e) => e.row);
  }

  markDirty(compressorIds: readonly number[]): void {
    for (const id of compressorIds) {
      const e = this.entries.get(id);
      if (e) e.dirty = true;
    }
  }

  takeDirty(): CompressorStateInput[] {
    const out: CompressorStateInput[] = [];
    for (const e of this.entries.values()) {
      if (!e.dirty) continue;
      e.dirty = false;
      out.push({ ...e.row });
    }
    return out;
  }
}
