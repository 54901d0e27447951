import { describe, expect, it } from "vitest";
import { plausibleCeilingBar, withholdImplausible } from "@/lib/ingester/plausibility";
import { telemetryToReading } from "@/shared/telemetry";

const reading = (deliveryBar: number, stageBar: (number | null)[]) =>
  telemetryToReading(1, {
    v: 1,
    seq: 1,
    ts: 1,
    runState: "running",
    motorOn: true,
    deliveryBar,
    stageBar,
    hourMeterH: 1,
    starts: 1,
  });

describe("pressure plausibility", () => {
  it("puts the ceiling 20 % above the rating: 10 % surge over the safety valve (PED 2014/68/EU Annex I 7.3, from memory) and 10 % for the transmitter and the rating (common practice)", () => {
    expect(plausibleCeilingBar(225)).toBeCloseTo(270, 9);
    expect(plausibleCeilingBar(420)).toBeCloseTo(504, 9);
  });

  it("withholds each pressure above the ceiling and keeps everything else", () => {
    const r = reading(675, [6, 40, 271, null]);
    expect(withholdImplausible(r, 225)).toEqual(["deliveryBar", "stage3Bar"]);
    expect(r).toMatchObject({ deliveryBar: null, stage1Bar: 6, stage2Bar: 40, stage3Bar: null, stage4Bar: null });
    expect(r.implausible).toEqual({ deliveryBar: 675, stage3Bar: 271 });
  });

  it("leaves a plausible reading alone, up to and including the ceiling", () => {
    const r = reading(270, [6, 40, 270]);
    expect(withholdImplausible(r, 225)).toEqual([]);
    expect(r.deliveryBar).toBe(270);
    expect(r.implausible).toBeUndefined();
  });
});
