import {
  type DeviceEvent,
  type DeviceStatus,
  type ReadingInput,
  runStateCode,
  type Telemetry,
  TELEMETRY_VERSION,
} from "../shared/telemetry";
import type { ModelEvent, ModelReading } from "./model/compressor";

/** Sequence numbers are the device clock in ms, bumped when two messages share a millisecond: they rise across restarts. */
export class SequenceCounter {
  private last = -1;

  next(ts: number): number {
    this.last = Math.max(this.last + 1, Math.floor(ts));
    return this.last;
  }
}

export function telemetryMessage(r: ModelReading, seq: number, ts: number): Telemetry {
  return {
    v: TELEMETRY_VERSION,
    seq,
    ts,
    runState: r.runState,
    motorOn: r.motorOn,
    deliveryBar: r.deliveryBar,
    stageBar: r.stageBar,
    stageC: r.stageC,
    oilBar: r.oilBar,
    purifierC: r.purifierC,
    intakeC: r.intakeC,
    hourMeterH: r.hourMeterH,
    starts: r.starts,
    tripCode: r.tripCode,
  };
}

export function eventMessage(e: ModelEvent, seq: number, ts: number): DeviceEvent {
  return {
    v: TELEMETRY_VERSION,
    seq,
    ts,
    kind: e.kind,
    runState: e.runState,
    tripCode: e.tripCode,
    text: e.text.slice(0, 200),
  };
}

export const onlineStatus = (ts: number): DeviceStatus => ({ v: TELEMETRY_VERSION, status: "online", ts });
export const offlineStatus = (ts: number): DeviceStatus => ({ v: TELEMETRY_VERSION, status: "offline", ts });
/** The last will carries no time: the broker sends it whenever the connection is found dead. */
export const LAST_WILL: DeviceStatus = { v: TELEMETRY_VERSION, status: "offline" };

/** The stored row a reading becomes; the same as telemetryToReading(telemetryMessage(r)) without the message object. */
export function readingRow(compressorId: number, r: ModelReading, seq: number, ts: number): ReadingInput {
  const sb = r.stageBar;
  const sc = r.stageC;
  return {
    compressorId,
    ts,
    seq,
    deliveryBar: r.deliveryBar,
    stage1Bar: sb[0] ?? null,
    stage2Bar: sb[1] ?? null,
    stage3Bar: sb[2] ?? null,
    stage4Bar: sb[3] ?? null,
    stage1C: sc[0] ?? null,
    stage2C: sc[1] ?? null,
    stage3C: sc[2] ?? null,
    stage4C: sc[3] ?? null,
    oilBar: r.oilBar,
    purifierC: r.purifierC,
    // The simulated purifier sends no pressure of its own: cartridge life falls back to delivery pressure.
    purifierBar: null,
    intakeC: r.intakeC,
    runState: runStateCode[r.runState],
    motorOn: r.motorOn ? 1 : 0,
    hourMeterH: r.hourMeterH,
    starts: r.starts,
    tripCode: r.tripCode,
  };
}
