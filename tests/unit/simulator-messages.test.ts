import path from "node:path";
import { describe, expect, it } from "vitest";
import {
  deviceEventSchema,
  MAX_PAYLOAD_BYTES,
  parseTopic,
  statusSchema,
  telemetrySchema,
  telemetryToReading,
  topicFor,
} from "@/shared/telemetry";
import { DeviceSim } from "@/simulator/device-sim";
import { type DemoDevice, defaultDevicesPath, demoDevicesFileSchema, specFor } from "@/simulator/devices";
import { eventMessage, LAST_WILL, offlineStatus, onlineStatus, readingRow, SequenceCounter, telemetryMessage } from "@/simulator/messages";
import { faultKinds, type FaultSpec } from "@/simulator/model/faults";

const base = { secret: "s3cret-for-tests", compressorId: 1, name: "Unit" } as const;
const fleet: DemoDevice[] = [
  { ...base, deviceId: "t-big", siteCode: "north", timeZone: "Europe/London", stages: 4, ratedDeliveryLpm: 450, ratedPressureBar: 420, stopPressureBar: 414, restartPressureBar: 370, bankVolumeL: 200, profile: "fire" },
  { ...base, deviceId: "t-mid", siteCode: "north", timeZone: "Europe/Oslo", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200, profile: "dive" },
  { ...base, deviceId: "t-small", siteCode: "reef", timeZone: "Europe/Malta", stages: 3, ratedDeliveryLpm: 80, ratedPressureBar: 225, stopPressureBar: 200, restartPressureBar: 165, bankVolumeL: 0, profile: "dive" },
  { ...base, deviceId: "t-two", siteCode: "works", timeZone: "America/Chicago", stages: 2, ratedDeliveryLpm: 120, ratedPressureBar: 225, stopPressureBar: 220, restartPressureBar: 190, bankVolumeL: 100, profile: "industrial" },
];

describe("published messages", () => {
  it("every telemetry and event message of a faulty day passes the contract", () => {
    const T0 = Date.UTC(2025, 0, 10);
    const faults: FaultSpec[] = fleet.flatMap((d, i) =>
      faultKinds.map((kind, k) => ({ deviceId: d.deviceId, kind, atMs: T0 + (k * 2.5 + i) * 3_600_000, durationMs: 2 * 3_600_000 })),
    );
    let telemetry = 0;
    let events = 0;
    const nulls = new Set<string>();
    for (const d of fleet) {
      const sim = new DeviceSim(d, { seed: "contract", startMs: T0, faults, maxStepS: 5 });
      const seq = new SequenceCounter();
      for (let t = T0 + 5000; t <= T0 + 86_400_000; t += 5000) {
        for (const e of sim.advance(5)) {
          const msg = eventMessage(e, seq.next(e.ts), e.ts);
          const parsed = deviceEventSchema.safeParse(JSON.parse(JSON.stringify(msg)));
          if (!parsed.success) throw new Error(`${d.deviceId}: ${parsed.error.message} in ${JSON.stringify(msg)}`);
          events++;
        }
        const r = sim.model.reading();
        const msg = telemetryMessage(r, seq.next(t), t);
        const json = JSON.stringify(msg);
        if (json.length >= MAX_PAYLOAD_BYTES) throw new Error(`payload too large: ${json.length}`);
        const parsed = telemetrySchema.safeParse(JSON.parse(json));
        if (!parsed.success) throw new Error(`${d.deviceId}: ${parsed.error.message} in ${json}`);
        if (r.stageC.includes(null)) nulls.add(d.deviceId);
        if (t % 3_600_000 === 0) expect(readingRow(7, r, msg.seq, t)).toEqual(telemetryToReading(7, parsed.data));
        telemetry++;
      }
    }
    expect(telemetry).toBe(fleet.length * 17_280);
    expect(events).toBeGreaterThan(25);
    expect(nulls.size).toBe(fleet.length);
  });

  it("status messages and the last will pass the contract, on topics the ingester parses", () => {
    for (const s of [LAST_WILL, onlineStatus(Date.now()), offlineStatus(Date.now())]) expect(statusSchema.safeParse(s).success).toBe(true);
    expect(JSON.stringify(LAST_WILL)).toBe('{"v":1,"status":"offline"}');
    for (const ch of ["telemetry", "status", "event"] as const) {
      expect(parseTopic(topicFor("reef", "t-small", ch))).toEqual({ siteCode: "reef", deviceId: "t-small", channel: ch });
    }
  });

  it("numbers messages by time, strictly increasing even within a millisecond", () => {
    const seq = new SequenceCounter();
    expect(seq.next(1_700_000_000_000)).toBe(1_700_000_000_000);
    expect(seq.next(1_700_000_000_000)).toBe(1_700_000_000_001);
    expect(seq.next(1_700_000_000_500)).toBe(1_700_000_000_500);
    // a restarted simulator continues above what an earlier run sent, because time has moved on
    expect(new SequenceCounter().next(Date.now())).toBeGreaterThan(1_700_000_000_500);
  });
});

describe("device list", () => {
  it("accepts the list the demo seed writes, including a unit without a bank", () => {
    const parsed = demoDevicesFileSchema.parse({ devices: fleet });
    expect(specFor(parsed.devices[2]!)).toMatchObject({ bankVolumeL: 0, oilPump: false });
    expect(specFor(parsed.devices[0]!).oilPump).toBe(true);
  });

  it("rejects set points the wrong way round and unknown time zones", () => {
    expect(demoDevicesFileSchema.safeParse({ devices: [{ ...fleet[0]!, restartPressureBar: 420 }] }).success).toBe(false);
    expect(demoDevicesFileSchema.safeParse({ devices: [{ ...fleet[0]!, timeZone: "Mars/Olympus" }] }).success).toBe(false);
    expect(demoDevicesFileSchema.safeParse({ devices: [{ ...fleet[0]!, profile: "space" }] }).success).toBe(false);
  });

  it("lives beside the database", () => {
    expect(defaultDevicesPath("data/airkeep.db")).toBe(path.join("data", "demo-devices.json"));
    expect(defaultDevicesPath("file:/srv/ak/main.db")).toBe(path.join("/srv/ak", "demo-devices.json"));
  });
});
