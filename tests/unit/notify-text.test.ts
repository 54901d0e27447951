import { describe, expect, it } from "vitest";
import { cautions, SAFETY_NOTICE } from "@/shared/safety";
import {
  cautionsFor,
  composeAlarmMail,
  composeDigestMail,
  composeTestMail,
  escapeHtml,
  formatAge,
  formatLocal,
  type MailContext,
  type NoticeAlarm,
} from "@/shared/notify-text";

const now = Date.UTC(2025, 0, 15, 12, 0, 0); // winter: GMT in London, CET in Oslo
const ctx: MailContext = { now, baseUrl: "https://airkeep.example.org/", units: { pressureUnit: "bar", temperatureUnit: "C" }, recipientName: "Olive" };

const alarm = (a: Partial<NoticeAlarm> = {}): NoticeAlarm => ({
  id: 41,
  key: "oilBar.low.warning",
  priority: "warning",
  signal: "oilBar",
  title: "Oil pressure low",
  compressorName: "HR-2 Workshop",
  siteName: "Heronfold Ridge Fire Station",
  timeZone: "Europe/Oslo",
  state: "active-unacknowledged",
  active: true,
  raisedAt: now - 90_000,
  clearedAt: null,
  value: 1.23,
  limitValue: 1.5,
  tripCode: null,
  chattering: false,
  ackAt: null,
  ackByName: null,
  ackComment: null,
  lastDataAt: now - 5000,
  ...a,
});

describe("cautions", () => {
  it("picks the trade's cautions that matter", () => {
    expect(cautionsFor({ key: "stage3C.high.warning", signal: "stage3C", tripCode: null })).toEqual([cautions.hotStage]);
    expect(cautionsFor({ key: "intakeC.high.advisory", signal: "intakeC", tripCode: null })).toEqual([cautions.intakeCo]);
    expect(cautionsFor({ key: "purifierC.high.warning", signal: "purifierC", tripCode: null })).toEqual([cautions.spentCartridge]);
    expect(cautionsFor({ key: "deliveryBar.high.critical", signal: "deliveryBar", tripCode: null })).toEqual([cautions.cylinderFill]);
    expect(cautionsFor({ key: "deliveryBar.low.warning", signal: "deliveryBar", tripCode: null })).toEqual([]);
    expect(cautionsFor({ key: "trip", signal: null, tripCode: 120 })).toEqual([cautions.hotStage]);
    expect(cautionsFor({ key: "trip", signal: null, tripCode: 520 })).toEqual([cautions.spentCartridge]);
    expect(cautionsFor({ key: "comms", signal: null, tripCode: null })).toEqual([]);
  });
});

describe("formatting", () => {
  it("writes local times with their zone, and ages", () => {
    expect(formatLocal(now, "Europe/Oslo")).toBe("2025-01-15 13:00:00 CET");
    expect(formatLocal(now, "Europe/London")).toBe("2025-01-15 12:00:00 GMT");
    expect(formatAge(42_000)).toBe("42 s");
    expect(formatAge(250_000)).toBe("4 min 10 s");
    expect(formatAge(3 * 3_600_000 + 12 * 60_000)).toBe("3 h 12 min");
    expect(formatAge(52 * 3_600_000)).toBe("2 d 4 h");
  });
});

describe("an alarm e-mail", () => {
  it("says what, where, value against limit with units, the reading's age, the link and the safety notice", () => {
    const m = composeAlarmMail("raise", alarm(), ctx);
    expect(m.subject).toBe("[Warning] HR-2 Workshop, Heronfold Ridge Fire Station: Oil pressure low");
    expect(m.text).toContain("Value:         1.2 bar, below the warning limit of 1.5 bar");
    expect(m.text).toContain("Reading taken: 2025-01-15 12:58:30 CET, 1 min 30 s before this message was written");
    expect(m.text).toContain("https://airkeep.example.org/alarms?id=41");
    expect(m.text).toContain(SAFETY_NOTICE);
    expect(m.text).toContain(cautions.oilCarryOver);
    expect(m.text).not.toContain("may be offline");
  });

  it("warns when the compressor's data is stale or missing", () => {
    expect(composeAlarmMail("raise", alarm({ lastDataAt: now - 10 * 60_000 }), ctx).text).toContain("The unit may be offline");
    expect(composeAlarmMail("raise", alarm({ lastDataAt: null }), ctx).text).toContain("none received from this compressor");
  });

  it("escapes names in the HTML part", () => {
    const m = composeAlarmMail("raise", alarm({ compressorName: `<img src=x onerror="alert(1)">` }), ctx);
    expect(m.html).not.toContain("<img");
    expect(m.html).toContain(escapeHtml(`<img src=x onerror="alert(1)">`));
    expect(m.html).toContain(escapeHtml(SAFETY_NOTICE));
  });

  it("describes a trip, a comms loss and a cleared alarm", () => {
    const trip = composeAlarmMail("raise", alarm({ key: "trip", signal: null, tripCode: 110, value: null, limitValue: null, title: "Trip 110: Final stage over-temperature", priority: "critical" }), ctx);
    expect(trip.text).toContain("Trip:          110 Final stage over-temperature");
    expect(trip.text).toContain(cautions.hotStage);
    const comms = composeAlarmMail("raise", alarm({ key: "comms", signal: null, value: null, limitValue: null, title: "Communication lost" }), ctx);
    expect(comms.text).toContain("Lost at:");
    const cleared = composeAlarmMail("resolved", alarm({ active: false, state: "cleared-unacknowledged", clearedAt: now - 1000 }), ctx);
    expect(cleared.subject).toBe("[Cleared] Warning HR-2 Workshop, Heronfold Ridge Fire Station: Oil pressure low");
    expect(cleared.text).toContain("still needs acknowledging");
    expect(cleared.text).toContain(SAFETY_NOTICE);
  });

  it("digests list every alarm with its link, and carry the notice", () => {
    const d = composeDigestMail(
      "digest",
      { siteId: 3, siteName: "Heronfold Ridge Fire Station", timeZone: "Europe/Oslo", windowMin: 10, alarms: [alarm(), alarm({ id: 42, priority: "critical" })], alreadySent: [] },
      ctx,
    );
    expect(d.subject).toBe("[Critical] 2 alarms at Heronfold Ridge Fire Station (many alarms in 10 min)");
    expect(d.text.indexOf("alarms?id=42")).toBeLessThan(d.text.indexOf("alarms?id=41")); // most urgent first
    expect(d.text).toContain("https://airkeep.example.org/alarms?site=3");
    expect(d.text).toContain(SAFETY_NOTICE);
    expect(composeTestMail(ctx, "Ade").text).toContain(SAFETY_NOTICE);
  });
});
