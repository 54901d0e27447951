import { describe, expect, it } from "vitest";
import { coveringShift, describeShift, localParts, offsetAt, onCallAt, shiftOn, zonedInstant, type RotaEntry } from "@/shared/notify-rota";

// Source of the clock changes: the IANA tz database (tzdata), as compiled into ICU and read through Intl.
// Europe/London and Europe/Oslo both follow the EU rule: summer time from the last Sunday of March 01:00 UTC to the
// last Sunday of October 01:00 UTC. In 2025 those Sundays are 30 March and 26 October.
//   London: 30 Mar 01:00 GMT → 02:00 BST; 26 Oct 02:00 BST → 01:00 GMT.
//   Oslo:   30 Mar 02:00 CET → 03:00 CEST; 26 Oct 03:00 CEST → 02:00 CET.

const H = 3_600_000;
const utc = (iso: string) => Date.parse(iso);
const every = [1, 2, 3, 4, 5, 6, 7];
let nextId = 1;
const entry = (e: Partial<RotaEntry>): RotaEntry => ({ id: nextId++, contactId: 1, position: 0, weekdays: every, startTime: "00:00", endTime: "08:00", ...e });

describe("offsets from the tz database", () => {
  it("knows the 2025 changes in London and Oslo", () => {
    expect(offsetAt(utc("2025-03-30T00:59:00Z"), "Europe/London")).toBe(0);
    expect(offsetAt(utc("2025-03-30T01:00:00Z"), "Europe/London")).toBe(H);
    expect(offsetAt(utc("2025-10-26T00:59:00Z"), "Europe/London")).toBe(H);
    expect(offsetAt(utc("2025-10-26T01:00:00Z"), "Europe/London")).toBe(0);
    expect(offsetAt(utc("2025-03-30T00:59:00Z"), "Europe/Oslo")).toBe(H);
    expect(offsetAt(utc("2025-03-30T01:00:00Z"), "Europe/Oslo")).toBe(2 * H);
    expect(offsetAt(utc("2025-10-26T01:00:00Z"), "Europe/Oslo")).toBe(H);
  });

  it("reads a wall time that happens twice as its first occurrence, and one that never happens as just after the gap", () => {
    // 26 Oct 2025, Oslo: 02:30 CEST (00:30Z) and again 02:30 CET (01:30Z).
    expect(localParts(utc("2025-10-26T00:30:00Z"), "Europe/Oslo")).toMatchObject({ hour: 2, minute: 30 });
    expect(localParts(utc("2025-10-26T01:30:00Z"), "Europe/Oslo")).toMatchObject({ hour: 2, minute: 30 });
    expect(zonedInstant({ year: 2025, month: 10, day: 26 }, 150, "Europe/Oslo")).toBe(utc("2025-10-26T00:30:00Z"));
    // 30 Mar 2025, Oslo: 02:30 does not exist; read with the offset before the gap → 03:30 CEST = 01:30Z.
    expect(zonedInstant({ year: 2025, month: 3, day: 30 }, 150, "Europe/Oslo")).toBe(utc("2025-03-30T01:30:00Z"));
    // London: 01:30 on 30 March does not exist → 02:30 BST = 01:30Z; 01:30 on 26 October happens twice → 00:30Z.
    expect(zonedInstant({ year: 2025, month: 3, day: 30 }, 90, "Europe/London")).toBe(utc("2025-03-30T01:30:00Z"));
    expect(zonedInstant({ year: 2025, month: 10, day: 26 }, 90, "Europe/London")).toBe(utc("2025-10-26T00:30:00Z"));
    // An ordinary day.
    expect(zonedInstant({ year: 2025, month: 6, day: 2 }, 8 * 60, "Europe/London")).toBe(utc("2025-06-02T07:00:00Z"));
  });
});

describe("shifts across the clock changes (Europe/London)", () => {
  const night = entry({ weekdays: [7], startTime: "00:00", endTime: "08:00" });

  it("a Sunday 00:00–08:00 shift lasts 7 hours on the spring-forward day", () => {
    const s = shiftOn(night, { year: 2025, month: 3, day: 30 }, "Europe/London")!;
    expect(s).toEqual({ start: utc("2025-03-30T00:00:00Z"), end: utc("2025-03-30T07:00:00Z") });
    expect(coveringShift(night, utc("2025-03-30T06:59:59Z"), "Europe/London")).not.toBeNull();
    expect(coveringShift(night, utc("2025-03-30T07:00:00Z"), "Europe/London")).toBeNull(); // 08:00 BST
  });

  it("and 9 hours on the fall-back day", () => {
    const s = shiftOn(night, { year: 2025, month: 10, day: 26 }, "Europe/London")!;
    expect(s).toEqual({ start: utc("2025-10-25T23:00:00Z"), end: utc("2025-10-26T08:00:00Z") });
    expect(coveringShift(night, utc("2025-10-25T23:00:00Z"), "Europe/London")).not.toBeNull(); // 00:00 BST
    expect(coveringShift(night, utc("2025-10-26T07:59:00Z"), "Europe/London")).not.toBeNull(); // 07:59 GMT
    expect(coveringShift(night, utc("2025-10-25T22:59:00Z"), "Europe/London")).toBeNull(); // Saturday 23:59 BST
  });

  it("a 24-hour shift starting the Saturday before spring-forward is 23 hours long", () => {
    const day = entry({ weekdays: [6], startTime: "08:00", endTime: "08:00" });
    const s = shiftOn(day, { year: 2025, month: 3, day: 29 }, "Europe/London")!;
    expect((s.end - s.start) / H).toBe(23);
  });
});

describe("handover in the hour the clocks change (Europe/Oslo)", () => {
  const night = entry({ contactId: 10, weekdays: every, startTime: "18:00", endTime: "02:30" });
  const day = entry({ contactId: 20, weekdays: every, startTime: "02:30", endTime: "18:00" });
  const who = (iso: string) => onCallAt([night, day], utc(iso), "Europe/Oslo").map((e) => e.contactId);

  it("spring forward: the 02:30 handover happens at 03:30 CEST, with nobody missing", () => {
    expect(who("2025-03-30T00:30:00Z")).toEqual([10]); // 01:30 CET
    expect(who("2025-03-30T01:00:00Z")).toEqual([10]); // 03:00 CEST
    expect(who("2025-03-30T01:29:59Z")).toEqual([10]); // 03:29:59 CEST
    expect(who("2025-03-30T01:30:00Z")).toEqual([20]); // 03:30 CEST
  });

  it("fall back: the handover is at the first 02:30, and the repeated hour does not hand back", () => {
    expect(who("2025-10-26T00:29:00Z")).toEqual([10]); // 02:29 CEST
    expect(who("2025-10-26T00:30:00Z")).toEqual([20]); // 02:30 CEST
    expect(who("2025-10-26T01:15:00Z")).toEqual([20]); // 02:15 CET, the second time round
    expect(who("2025-10-26T01:45:00Z")).toEqual([20]); // 02:45 CET
    const s = shiftOn(night, { year: 2025, month: 10, day: 25 }, "Europe/Oslo")!;
    expect((s.end - s.start) / H).toBe(8.5);
  });

  it("someone, and only one, is on call every five minutes of both change days", () => {
    for (const day0 of ["2025-03-29T22:00:00Z", "2025-10-25T22:00:00Z"]) {
      for (let t = utc(day0); t < utc(day0) + 30 * H; t += 5 * 60_000) {
        expect(onCallAt([night, day], t, "Europe/Oslo")).toHaveLength(1);
      }
    }
  });
});

describe("weekdays, order and wording", () => {
  it("an overnight shift belongs to the day it starts", () => {
    const fri = entry({ weekdays: [5], startTime: "22:00", endTime: "06:00" });
    expect(coveringShift(fri, utc("2025-06-07T02:00:00Z"), "Europe/London")).not.toBeNull(); // Sat 03:00 BST
    expect(coveringShift(fri, utc("2025-06-08T02:00:00Z"), "Europe/London")).toBeNull(); // Sun 03:00 BST
    expect(coveringShift(fri, utc("2025-06-06T20:59:00Z"), "Europe/London")).toBeNull(); // Fri 21:59 BST
  });

  it("lists people on call at once in rota order", () => {
    const a = entry({ contactId: 1, position: 2 });
    const b = entry({ contactId: 2, position: 1 });
    expect(onCallAt([a, b], utc("2025-06-02T05:00:00Z"), "Europe/London").map((e) => e.contactId)).toEqual([2, 1]);
  });

  it("describes shifts", () => {
    expect(describeShift({ weekdays: [1, 2, 3, 4, 5], startTime: "07:00", endTime: "19:00" })).toBe("Mon–Fri 07:00–19:00");
    expect(describeShift({ weekdays: [6, 7], startTime: "19:00", endTime: "07:00" })).toBe("Sat, Sun 19:00–07:00 (next day)");
    expect(describeShift({ weekdays: every, startTime: "08:00", endTime: "08:00" })).toBe("Every day 08:00–08:00 (next day)");
    expect(describeShift({ weekdays: [1, 3, 5], startTime: "08:00", endTime: "12:00" })).toBe("Mon, Wed, Fri 08:00–12:00");
  });
});
