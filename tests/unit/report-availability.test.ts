import { describe, expect, it } from "vitest";
import {
  availabilityOf,
  clipIntervals,
  eventsHref,
  formatDuration,
  isFailureTrip,
  mergeIntervals,
  mtbfSeconds,
  mttrSeconds,
  pairDeviceEvents,
  pairPlannedService,
  parseScope,
  scopeParam,
  splitTime,
  type StateEvent,
  formatAvailability,
} from "@/shared/availability";

const H = 3600;

describe("availability, MTBF and MTTR against published worked examples", () => {
  // Source: worked exercise "Calculate the MTBF and MTTR of component 1" (a component required 24 h a day,
  // Monday to Friday; fails Tuesday 05:00–07:00, Thursday 16:00–20:00, Friday 08:00–11:00), published with its
  // solution: total down time 9 h, up time 5 × 24 − 9 = 111 h, MTBF = 111 / 3 = 37 h, MTTR = 9 / 3 = 3 h
  // (scribd.com, document 403226083, "Exercise 1").
  const downs = [2 * H, 4 * H, 3 * H];
  const periodS = 5 * 24 * H;
  const upS = periodS - downs.reduce((a, b) => a + b, 0);

  it("MTBF = operating time / failures = 37 h (IEV 192-05-13; estimator of NIST e-Handbook §8.4.5.1)", () => {
    expect(mtbfSeconds(upS, 3)).toBe(37 * H);
  });

  it("MTTR = mean time to restoration = 3 h (IEV 192-07-23)", () => {
    expect(mttrSeconds(downs)).toBe(3 * H);
  });

  it("availability = up time / period = 111 / 120 (computed by hand from the same exercise) = MTBF / (MTBF + MTTR)", () => {
    const split = splitTime(periodS, { coveredS: periodS, runS: upS, trippedS: 9 * H });
    expect(split).toEqual({ periodS, runningS: upS, standbyS: 0, faultS: 9 * H, plannedS: 0, noDataS: 0 });
    const f = availabilityOf(split);
    expect(f.availability).toBeCloseTo(111 / 120, 12);
    expect(f.availability).toBeCloseTo(37 / (37 + 3), 12);
  });

  it("several units: MTBF is total operating time over total failures, not the mean of each unit's MTBF (NIST e-Handbook §8.4.5.1; case constructed and computed by hand)", () => {
    // Unit A: 500 h operating, 1 failure; unit B: 300 h operating, 1 failure; unit C: 200 h, no failure.
    // Total 1000 h / 2 failures = 500 h. The mean of the units' own MTBFs would be (500 + 300) / 2 = 400 h, and
    // would leave out C's failure-free hours.
    expect(mtbfSeconds((500 + 300 + 200) * H, 2)).toBe(500 * H);
    expect(mtbfSeconds(200 * H, 0)).toBeNull();
    expect(mttrSeconds([])).toBeNull();
  });
});

describe("the five states of a period (cases constructed and computed by hand)", () => {
  it("time without data is never up", () => {
    // 744 h month, readings cover 504 h: 400 h running, 100 h standby, 4 h tripped; 240 h without data.
    const s = splitTime(744 * H, { coveredS: 504 * H, runS: 400 * H, trippedS: 4 * H });
    expect(s).toEqual({ periodS: 744 * H, runningS: 400 * H, standbyS: 100 * H, faultS: 4 * H, plannedS: 0, noDataS: 240 * H });
    const f = availabilityOf(s);
    expect(f.availability).toBeCloseTo(500 / 744, 12);
    expect(f.coverage).toBeCloseTo(504 / 744, 12);
  });

  it("planned service takes precedence and is given both counted as down and excluded", () => {
    // 720 h, all covered: 300 h running, 20 h tripped, rest standby. 8 h planned service, during which the
    // machine reported 1 h running and 7 h standby.
    const s = splitTime(720 * H, { coveredS: 720 * H, runS: 300 * H, trippedS: 20 * H }, { plannedS: 8 * H, inside: { coveredS: 8 * H, runS: 1 * H, trippedS: 0 } });
    expect(s).toEqual({ periodS: 720 * H, runningS: 299 * H, standbyS: 393 * H, faultS: 20 * H, plannedS: 8 * H, noDataS: 0 });
    const f = availabilityOf(s);
    expect(f.availability).toBeCloseTo(692 / 720, 12);
    expect(f.availabilityExPlanned).toBeCloseTo(692 / 712, 12);
    expect(f.downS).toBe(28 * H);
  });

  it("tripped time is never also counted as running", () => {
    const s = splitTime(H, { coveredS: 3600, runS: 3600, trippedS: 600 });
    expect(s.faultS).toBe(600);
    expect(s.runningS).toBe(3000);
    expect(s.standbyS).toBe(0);
  });

  it("an empty period has no availability", () => {
    expect(availabilityOf(splitTime(0, { coveredS: 0, runS: 0, trippedS: 0 })).availability).toBeNull();
    // A whole month without a reading or planned service: "no data", never 0 %.
    const dark = availabilityOf(splitTime(744 * 3600, { coveredS: 0, runS: 0, trippedS: 0 }));
    expect(dark.availability).toBeNull();
    expect(dark.availabilityExPlanned).toBeNull();
    expect(formatAvailability(dark.availability)).toBe("no data");
    // One hour of standby in the month is data: a (lower-bound) availability of 1/744.
    expect(availabilityOf(splitTime(744 * 3600, { coveredS: 3600, runS: 0, trippedS: 0 })).availability).toBeCloseTo(1 / 744, 12);
  });
});

describe("outages from the machine's events", () => {
  const ev = (ts: number, kind: StateEvent["kind"], runState: StateEvent["runState"] = null, tripCode: number | null = null): StateEvent => ({
    ts,
    compressorId: 7,
    kind,
    runState,
    tripCode,
    text: "",
  });

  it("a trip runs until the next state event that is not tripped; comms losses pair too", () => {
    const out = pairDeviceEvents([
      ev(100, "state", "running"),
      ev(200, "trip", "tripped", 110),
      ev(250, "state", "tripped"),
      ev(300, "comms_lost"),
      ev(400, "comms_restored"),
      ev(500, "state", "standby"),
      ev(600, "trip", "tripped", 910),
      ev(700, "state", "stopped"),
      ev(800, "trip", "tripped", null),
    ]);
    expect(out.map((o) => [o.kind, o.start, o.end, o.tripCode, o.failure])).toEqual([
      ["trip", 200, 500, 110, true],
      ["comms", 300, 400, null, false],
      ["trip", 600, 700, 910, false],
      ["trip", 800, null, null, true],
    ]);
    expect(out[0]!.cause).toBe("Trip 110: Final stage over-temperature");
    expect(out[2]!.cause).toBe("Trip 910: Emergency stop");
  });

  it("an emergency stop is down time but not a failure; unknown codes count as failures", () => {
    expect(isFailureTrip(910)).toBe(false);
    expect(isFailureTrip(110)).toBe(true);
    expect(isFailureTrip(4242)).toBe(true);
    expect(isFailureTrip(null)).toBe(true);
  });

  it("planned-service starts pair with the next end; an open one runs to the end of the period", () => {
    const rows = [
      { ts: 10, action: "service.planned_start" },
      { ts: 20, action: "service.planned_end" },
      { ts: 30, action: "service.planned_end" },
      { ts: 40, action: "service.planned_start" },
      { ts: 45, action: "service.planned_start" },
    ];
    expect(pairPlannedService(rows, 100)).toEqual([
      { from: 10, to: 20 },
      { from: 40, to: 100 },
    ]);
    expect(pairPlannedService([], 100)).toEqual([]);
    expect(mergeIntervals([{ from: 5, to: 9 }, { from: 1, to: 6 }, { from: 12, to: 12 }])).toEqual([{ from: 1, to: 9 }]);
    expect(clipIntervals([{ from: 0, to: 50 }, { from: 60, to: 70 }], 40, 65)).toEqual([
      { from: 40, to: 50 },
      { from: 60, to: 65 },
    ]);
  });
});

describe("links and scope parameters", () => {
  it("drills into the event log with the events page's parameters", () => {
    expect(eventsHref({ site: 3, kind: "trip", from: 1000.4, to: 2000 })).toBe("/events?site=3&kind=trip&from=1000&to=2000");
    expect(eventsHref({})).toBe("/events");
  });

  it("parses and prints scopes", () => {
    expect(parseScope("fleet")).toEqual({ kind: "fleet" });
    expect(parseScope("site-4")).toEqual({ kind: "site", siteId: 4 });
    expect(scopeParam(parseScope("compressor-12"))).toBe("compressor-12");
    expect(() => parseScope("site-0")).toThrow();
    expect(() => parseScope("compressor-x")).toThrow();
  });

  it("prints durations", () => {
    expect(formatDuration(42 * 60)).toBe("42 min");
    expect(formatDuration(3 * 3600 + 5 * 60)).toBe("3 h 05 min");
    expect(formatDuration(52 * 3600)).toBe("2 d 04 h");
  });
});
