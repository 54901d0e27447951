import { describe, expect, it } from "vitest";
import { eventCsvHeader, eventCsvRecord } from "@/app/api/events/csv";
import { csvField, csvRecord, csvText } from "@/shared/csv";
import {
  effectiveZone,
  eventFilterQuery,
  lenientEventSearchParams,
  parseEventSearchParams,
  zoneChoices,
} from "@/shared/event-schema";
import { formatZoned, isoWithOffset, offsetMinutes, utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import { ftsQuery } from "@/db/event-search";
import type { EventDto } from "@/shared/event-schema";

/** A strict reader of RFC 4180 text, to check what the writer produces round-trips. */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = "";
  let record: string[] = [];
  let i = 0;
  let quoted = false;
  while (i < text.length) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"';
        i += 2;
        continue;
      }
      if (ch === '"') {
        quoted = false;
        i++;
        continue;
      }
      field += ch;
      i++;
      continue;
    }
    if (ch === '"' && field === "") {
      quoted = true;
      i++;
    } else if (ch === ",") {
      record.push(field);
      field = "";
      i++;
    } else if (ch === "\r" && text[i + 1] === "\n") {
      record.push(field);
      records.push(record);
      record = [];
      field = "";
      i += 2;
    } else if (ch === '"' || ch === "\r" || ch === "\n") {
      throw new Error(`bare ${JSON.stringify(ch)} at ${i}`);
    } else {
      field += ch;
      i++;
    }
  }
  if (field !== "" || record.length) throw new Error("last record not ended by CRLF");
  return records;
}

describe("CSV writer against RFC 4180 (IETF, 2005), section 2", () => {
  it("rule 1-2: records end in CRLF, the last one too", () => {
    // RFC 4180 §2 rule 1 example: aaa,bbb,ccc CRLF zzz,yyy,xxx CRLF
    expect(csvRecord(["aaa", "bbb", "ccc"].map(csvField)) + csvRecord(["zzz", "yyy", "xxx"].map(csvField))).toBe(
      "aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n",
    );
  });

  it("rule 6: fields with line breaks, double quotes or commas are enclosed in double quotes", () => {
    // RFC 4180 §2 rule 6 example: "aaa","b CRLF bb","ccc"
    expect(csvField("b\r\nbb")).toBe('"b\r\nbb"');
    expect(csvField("b\nbb")).toBe('"b\nbb"');
    expect(csvField("a,b")).toBe('"a,b"');
    expect(csvField("aaa")).toBe("aaa");
  });

  it("rule 7: a double quote inside a quoted field is escaped by another double quote", () => {
    // RFC 4180 §2 rule 7 example: "aaa","b""bb","ccc"
    expect(csvRecord(["aaa", 'b"bb', "ccc"].map(csvField))).toBe('aaa,"b""bb",ccc\r\n');
  });

  it("round-trips awkward values through a strict RFC 4180 reader", () => {
    const values = ['He said "stop"', "one, two", "line1\r\nline2", "", "Ø ü 温度", '"', ",", "plain"];
    const text = csvRecord(values.map(csvField)) + csvRecord(values.map(csvField));
    expect(parseCsv(text)).toEqual([values, values]);
  });

  it("writes null as an empty field, numbers as digits", () => {
    expect(csvRecord([csvField(null), csvField(undefined), csvField(42)])).toBe(",,42\r\n");
  });

  it("neutralises text that a spreadsheet would run as a formula", () => {
    expect(csvText("=HYPERLINK(\"x\")")).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvText("+1")).toBe("'+1");
    expect(csvText("@SUM(A1)")).toBe("'@SUM(A1)");
    expect(csvText("Oil pressure low")).toBe("Oil pressure low");
  });

  // OWASP, "CSV Injection": a spreadsheet splitting on ; or a tab (locale or import setting) starts a new cell there.
  it("neutralises a formula after a separator inside a field", () => {
    expect(csvText("ok;=cmd|' /C calc'!A0")).toBe("ok;'=cmd|' /C calc'!A0");
    expect(csvText("ok,=1+1")).toBe(`"ok,'=1+1"`);
    expect(csvText("ok\t@SUM(A1)")).toBe("ok\t'@SUM(A1)");
    expect(csvText("ok; -2+3")).toBe("ok; '-2+3");
    expect(csvText("line one\n=1+1")).toBe(`"line one\n'=1+1"`);
    expect(csvText("5 - 3 = 2")).toBe("5 - 3 = 2");
  });

  it("writes an event with its time in ISO 8601 with the site's offset", () => {
    const e: EventDto = {
      id: 7,
      ts: Date.UTC(2025, 6, 1, 12, 0, 0, 250),
      kind: "acknowledge",
      action: "alarm.acknowledge",
      priority: "warning",
      siteId: 1,
      siteName: "Heronfold Ridge",
      timeZone: "Europe/Oslo",
      compressorId: 3,
      compressorName: "HR-1 Bay compressor",
      alarmId: 11,
      actor: "Sam Okafor",
      text: 'Sam Okafor acknowledged HR-1: "checked, fan running"',
    };
    const [header, row] = parseCsv(eventCsvHeader + eventCsvRecord(e, "UTC"));
    expect(header![0]).toBe("time");
    expect(row).toEqual([
      "2025-07-01T14:00:00.250+02:00",
      "Europe/Oslo",
      "Heronfold Ridge",
      "HR-1 Bay compressor",
      "warning",
      "acknowledge",
      "alarm.acknowledge",
      "Sam Okafor",
      e.text,
      "7",
      "3",
      "11",
    ]);
    // An event of no site takes the zone the person reads in.
    const signIn = { ...e, siteId: null, siteName: null, timeZone: null, compressorId: null, compressorName: null, alarmId: null };
    expect(parseCsv(eventCsvRecord(signIn, "Europe/London"))[0]![0]).toBe("2025-07-01T13:00:00.250+01:00");
  });
});

describe("full-text query from what a person types", () => {
  it("quotes every word, so FTS5 operators and syntax are plain text", () => {
    expect(ftsQuery("oil pressure")).toBe('"oil" "pressure"*');
    expect(ftsQuery('NEAR(a b) OR text:"x" -y ^zz')).toBe('"NEAR(a" "b)" "OR" "text:""x""" "-y" "^zz"*');
    expect(ftsQuery("AND")).toBe('"AND"*');
  });

  it("makes the last word a prefix unless the input ends with a space or it is one character", () => {
    expect(ftsQuery("temp")).toBe('"temp"*');
    expect(ftsQuery("temperature ")).toBe('"temperature"');
    expect(ftsQuery("TA-3")).toBe('"TA-3"');
    expect(ftsQuery("viewer@airkeep.demo")).toBe('"viewer@airkeep.demo"*');
  });

  it("drops punctuation-only words and gives null when nothing is left", () => {
    expect(ftsQuery(" - * ( ")).toBeNull();
    expect(ftsQuery("")).toBeNull();
    expect(ftsQuery(null)).toBeNull();
    expect(ftsQuery('oil " -')).toBe('"oil"*');
  });

  it("limits the number of words", () => {
    expect(ftsQuery(Array.from({ length: 40 }, (_, i) => `w${i}`).join(" "))!.split(" ")).toHaveLength(16);
  });
});

describe("times in a site's zone", () => {
  it("converts wall time to UTC and back, across daylight saving", () => {
    // Europe/London: GMT in winter, BST (UTC+1) from 2025-03-30 01:00 UTC (IANA tz database).
    expect(zonedLocalToUtc("2025-01-15T08:00", "Europe/London")).toBe(Date.UTC(2025, 0, 15, 8, 0));
    expect(zonedLocalToUtc("2025-07-15T08:00", "Europe/London")).toBe(Date.UTC(2025, 6, 15, 7, 0));
    expect(zonedLocalToUtc("2025-07-15T08:00", "America/Halifax")).toBe(Date.UTC(2025, 6, 15, 11, 0));
    expect(utcToZonedLocal(Date.UTC(2025, 6, 15, 7, 0), "Europe/London")).toBe("2025-07-15T08:00");
    expect(formatZoned(Date.UTC(2025, 11, 31, 23, 30, 5), "Europe/Malta")).toBe("2026-01-01 00:30:05");
  });

  it("reads a skipped wall time with the offset before the change, and refuses impossible dates", () => {
    // 01:30 does not exist in London on 2025-03-30 (clocks go 01:00 → 02:00): read as GMT, i.e. 02:30 BST.
    expect(zonedLocalToUtc("2025-03-30T01:30", "Europe/London")).toBe(Date.UTC(2025, 2, 30, 1, 30));
    expect(zonedLocalToUtc("2025-03-30T00:30", "Europe/London")).toBe(Date.UTC(2025, 2, 30, 0, 30));
    expect(zonedLocalToUtc("2025-03-30T02:30", "Europe/London")).toBe(Date.UTC(2025, 2, 30, 1, 30));
    expect(zonedLocalToUtc("2025-02-30T10:00", "Europe/London")).toBeNull();
    expect(zonedLocalToUtc("yesterday", "UTC")).toBeNull();
  });

  it("writes ISO 8601 with the offset, negative and half-hour offsets included", () => {
    expect(isoWithOffset(Date.UTC(2025, 0, 1, 0, 0, 0, 5), "UTC")).toBe("2025-01-01T00:00:00.005+00:00");
    expect(isoWithOffset(Date.UTC(2025, 0, 1, 12, 0), "America/St_Johns")).toBe("2025-01-01T08:30:00.000-03:30");
    expect(offsetMinutes(Date.UTC(2025, 6, 1), "Australia/Adelaide")).toBe(570);
  });
});

describe("event log URL parameters", () => {
  const sites = [
    { id: 1, name: "Marrow Bay", timeZone: "Europe/London" },
    { id: 2, name: "Heronfold Ridge", timeZone: "Europe/Oslo" },
    { id: 3, name: "Cobalt Reef", timeZone: "Europe/Malta" },
  ];

  it("parses, refuses bad values in the API and drops them on the page", () => {
    const p = parseEventSearchParams(new URLSearchParams("q=oil&site=2&priority=critical&from=2025-03-01T00:00&after=1700000000000.42"));
    expect(p).toMatchObject({ q: "oil", site: 2, priority: "critical", from: "2025-03-01T00:00", after: { ts: 1700000000000, id: 42 } });
    expect(() => parseEventSearchParams(new URLSearchParams("priority=urgent"))).toThrow();
    expect(lenientEventSearchParams({ priority: "urgent", kind: "trip", site: "" })).toEqual({ kind: "trip" });
  });

  it("writes the filters in a fixed order without empty ones", () => {
    expect(eventFilterQuery({ tz: "Europe/Oslo", q: "fan belt", site: 2, kind: undefined })).toBe("q=fan+belt&site=2&tz=Europe%2FOslo");
  });

  it("reads times in the chosen site's zone, else the person's choice among their sites' zones", () => {
    expect(effectiveZone({ site: 2, tz: "Europe/Malta" }, sites)).toBe("Europe/Oslo");
    expect(effectiveZone({ tz: "Europe/Malta" }, sites)).toBe("Europe/Malta");
    expect(effectiveZone({ tz: "Asia/Tokyo" }, sites)).toBe("Europe/Malta"); // not a zone of theirs: the first by site name
    expect(effectiveZone({}, [])).toBe("UTC");
    expect(zoneChoices([...sites, { id: 4, name: "Aker Quay", timeZone: "Europe/Oslo" }]).map((z) => z.label)).toEqual([
      "Europe/Oslo (Aker Quay, Heronfold Ridge)",
      "Europe/Malta (Cobalt Reef)",
      "Europe/London (Marrow Bay)",
    ]);
  });
});
