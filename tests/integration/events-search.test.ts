import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDatabase, type Db } from "@/db/client";
import {
  eventQueryPlan,
  eventScopeOf,
  FTS_DRIVE_MAX,
  iterateEvents,
  searchEvents,
  type EventCursor,
  type EventFilter,
  type EventScope,
} from "@/db/event-search";
import type { EventDto } from "@/shared/event-schema";
import { appendEvent } from "@/db/events";
import { runMigrations } from "@/db/migrate";
import type { Priority } from "@/shared/alarm-rules";

// The event log's search on a real SQLite file with the migrations (FTS5 table and triggers included):
// words, filters, the caller's site scope, and keyset paging that returns every row exactly once.

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-events-"));
let db: Db;

const T0 = Date.UTC(2025, 2, 1, 0, 0, 0);
const N = 6000;
const TIE = 5; // five events share each timestamp

type Fixture = { siteA: number; siteB: number; siteC: number; a1: number; a2: number; b1: number; c1: number };
let fx: Fixture;

const admin: EventScope = eventScopeOf({ role: "admin", siteIds: null });
const supervisorAll: EventScope = eventScopeOf({ role: "supervisor", siteIds: null });

/** Expected order: newest first, ties by id, newest id first. */
const byTsIdDesc = (a: EventDto, b: EventDto) => b.ts - a.ts || b.id - a.id;

function pageThrough(scope: EventScope, filter: EventFilter, limit: number, scanBudget?: number): { ids: number[]; pages: number; partials: number } {
  const ids: number[] = [];
  let after: EventCursor | undefined;
  let pages = 0;
  let partials = 0;
  for (;;) {
    const page = searchEvents(db, scope, filter, { after, limit, scanBudget });
    pages++;
    if (page.partial) partials++;
    expect(page.events.length).toBeLessThanOrEqual(limit);
    if (!page.partial && page.next) expect(page.events).toHaveLength(limit);
    // Within a page: newest first, and strictly after the cursor.
    const sorted = [...page.events].sort(byTsIdDesc);
    expect(page.events.map((e) => e.id)).toEqual(sorted.map((e) => e.id));
    if (after) for (const e of page.events) expect(e.ts < after.ts || (e.ts === after.ts && e.id < after.id)).toBe(true);
    ids.push(...page.events.map((e) => e.id));
    if (!page.next) break;
    after = page.next;
    if (pages > 10_000) throw new Error("paging does not end");
  }
  return { ids, pages, partials };
}

/** The ids a filter should return, straight from the table, in order. */
function expectedIds(where: string, params: unknown[] = []): number[] {
  return (db.$client.prepare(`SELECT id FROM events WHERE ${where} ORDER BY ts DESC, id DESC`).all(...params) as { id: number }[]).map((r) => r.id);
}

beforeAll(() => {
  db = openDatabase(path.join(dir, "events.db"));
  runMigrations(db);
  const s = db.$client;
  const site = s.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, ?, 0)");
  const siteA = Number(site.run("Marrow Bay", "marrow-bay", "Europe/London").lastInsertRowid);
  const siteB = Number(site.run("Heronfold Ridge", "heronfold-ridge", "Europe/Oslo").lastInsertRowid);
  const siteC = Number(site.run("Cobalt Reef", "cobalt-reef", "Europe/Malta").lastInsertRowid);
  const model = Number(
    s.prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Petrel 250', 3, 250, 330, 0)").run()
      .lastInsertRowid,
  );
  const comp = s.prepare(
    "INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, ?, ?, ?, 300, 260, 0, 0)",
  );
  const a1 = Number(comp.run(siteA, model, "MB-1 Main", "S-1", "mb-1").lastInsertRowid);
  const a2 = Number(comp.run(siteA, model, "MB-2 Portable", "S-2", "mb-2").lastInsertRowid);
  const b1 = Number(comp.run(siteB, model, "HR-1 Bay compressor", "S-3", "hr-1").lastInsertRowid);
  const c1 = Number(comp.run(siteC, model, "CR-1 Fill station", "S-4", "cr-1").lastInsertRowid);
  fx = { siteA, siteB, siteC, a1, a2, b1, c1 };

  const units = [
    { id: a1, site: siteA, name: "MB-1 Main" },
    { id: a2, site: siteA, name: "MB-2 Portable" },
    { id: b1, site: siteB, name: "HR-1 Bay compressor" },
    { id: c1, site: siteC, name: "CR-1 Fill station" },
  ];
  const prios: (Priority | null)[] = ["critical", "warning", "advisory", null];
  // Inserted in a shuffled order, so ids do not follow time (as with devices that report late).
  const order = Array.from({ length: N }, (_, i) => i);
  let seed = 12345;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
  for (let i = order.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  s.transaction(() => {
    for (const i of order) {
      const u = units[i % units.length]!;
      const words = [
        i % 5 !== 0 ? "delivery pressure" : "state change",
        i % 3 === 0 ? "valve service" : "",
        i === 4323 || i === 17 ? "carbon monoxide suspected at intake" : "",
      ]
        .filter(Boolean)
        .join(", ");
      appendEvent(db, {
        ts: T0 + Math.floor(i / TIE) * 1000,
        kind: i % 7 === 0 ? "trip" : "alarm",
        action: "alarm.raise",
        priority: prios[i % prios.length]!,
        siteId: u.site,
        compressorId: u.id,
        text: `${u.name}: ${words} #${i}`,
      });
    }
    // Events of no site: sign-ins.
    for (let k = 0; k < 12; k++) {
      appendEvent(db, {
        ts: T0 + k * 60_000,
        kind: "auth",
        action: "auth.sign_in",
        actor: "ines.varga@example.org",
        text: "ines.varga@example.org signed in",
      });
    }
  })();
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("full-text search", () => {
  it("finds an event by a word of its text, and by the start of a word", () => {
    const page = searchEvents(db, admin, { q: "carbon" });
    expect(page.events.map((e) => e.text).sort()).toEqual([
      "CR-1 Fill station: delivery pressure, valve service, carbon monoxide suspected at intake #4323",
      "MB-2 Portable: delivery pressure, carbon monoxide suspected at intake #17",
    ]);
    expect(searchEvents(db, admin, { q: "monox" }).events).toHaveLength(2);
    expect(searchEvents(db, admin, { q: "monox " }).events).toHaveLength(0); // a finished word is not a prefix
    expect(page.events[0]).toMatchObject({ siteName: expect.any(String), compressorName: expect.any(String), timeZone: expect.any(String) });
  });

  it("finds a sign-in by the person's e-mail (actor column and text)", () => {
    const page = searchEvents(db, admin, { q: "ines.varga@example.org" });
    expect(page.events).toHaveLength(12);
    expect(page.events.every((e) => e.kind === "auth" && e.siteId === null)).toBe(true);
    expect(searchEvents(db, admin, { q: "ines.varga@exa" }).events).toHaveLength(12);
  });

  it("combines words with AND, and never fails on FTS5 syntax in the input", () => {
    expect(searchEvents(db, admin, { q: "carbon intake CR-1" }).events).toHaveLength(1);
    for (const q of ['"', "NEAR(", "text:", "a OR", "*", "-carbon", "(carbon", "carbon)", "^", "'; DROP TABLE events; --"]) {
      expect(() => searchEvents(db, admin, { q })).not.toThrow();
    }
    expect(searchEvents(db, admin, { q: " - ( " }).events).toHaveLength(0);
  });

  it("respects the filters: site, compressor, priority, kind and time range", () => {
    const from = T0 + 100_000;
    const to = T0 + 400_000;
    const f: EventFilter = { q: "valve", siteId: fx.siteA, priority: "critical", kind: "alarm", from, to };
    const got = pageThrough(admin, f, 25).ids;
    const want = expectedIds(
      "id IN (SELECT rowid FROM events_fts WHERE events_fts MATCH '\"valve\"*') AND site_id = ? AND priority = 'critical' AND kind = 'alarm' AND ts >= ? AND ts < ?",
      [fx.siteA, from, to],
    );
    expect(want.length).toBeGreaterThan(5);
    expect(got).toEqual(want);
    const byCompressor = pageThrough(admin, { q: "valve", compressorId: fx.b1 }, 50).ids;
    expect(byCompressor).toEqual(expectedIds("id IN (SELECT rowid FROM events_fts WHERE events_fts MATCH '\"valve\"*') AND compressor_id = ?", [fx.b1]));
  });
});

describe("site scope", () => {
  const onlyA = eventScopeOf({ role: "supervisor", siteIds: [0] });

  it("shows a limited person only their sites' events, and events of no site only to administrators", () => {
    const scope: EventScope = { ...onlyA, siteIds: [fx.siteA] };
    const all = pageThrough(scope, {}, 200).ids;
    expect(all).toEqual(expectedIds("site_id = ?", [fx.siteA]));
    expect(searchEvents(db, scope, { q: "carbon" }).events.map((e) => e.siteId)).toEqual([fx.siteA]);
    // Asking for another site's compressor or site gives nothing rather than that site's events.
    expect(searchEvents(db, scope, { compressorId: fx.b1 }).events).toHaveLength(0);
    expect(searchEvents(db, scope, { siteId: fx.siteB }).events).toHaveLength(0);
    // Sign-ins (no site): not for a supervisor, even one with every site; yes for an administrator.
    expect(searchEvents(db, supervisorAll, { q: "ines.varga@example.org" }).events).toHaveLength(0);
    expect(searchEvents(db, supervisorAll, { kind: "auth" }).events).toHaveLength(0);
    expect(searchEvents(db, admin, { kind: "auth" }).events).toHaveLength(12);
    expect(pageThrough(supervisorAll, {}, 500).ids).toEqual(expectedIds("site_id IS NOT NULL"));
  });

  it("gives an administrator limited to some sites those sites and the events of no site", () => {
    const scope = eventScopeOf({ role: "admin", siteIds: [fx.siteB] });
    expect(pageThrough(scope, {}, 300).ids).toEqual(expectedIds("site_id = ? OR site_id IS NULL", [fx.siteB]));
  });
});

describe("keyset paging", () => {
  it("returns every row exactly once, in (ts, id) order, with ties on ts and ids out of time order", () => {
    const { ids, pages } = pageThrough(admin, {}, 37);
    expect(ids).toEqual(expectedIds("1"));
    expect(new Set(ids).size).toBe(N + 12);
    expect(pages).toBe(Math.ceil((N + 12) / 37));
  });

  it("does so with words that drive the query (few matches) and words the index drives (many)", () => {
    const few = pageThrough(admin, { q: "valve" }, 29);
    expect(few.ids).toEqual(expectedIds("id IN (SELECT rowid FROM events_fts WHERE events_fts MATCH '\"valve\"*')"));
    expect(few.ids.length).toBeLessThanOrEqual(FTS_DRIVE_MAX);
    const many = pageThrough(admin, { q: "pressure" }, 41);
    expect(many.ids).toEqual(expectedIds("id IN (SELECT rowid FROM events_fts WHERE events_fts MATCH '\"pressure\"*')"));
    expect(many.ids.length).toBeGreaterThan(FTS_DRIVE_MAX);
  });

  it("still returns every row exactly once when a small scan budget cuts pages short", () => {
    const f: EventFilter = { priority: "critical", compressorId: fx.c1 };
    const cut = pageThrough(supervisorAll, f, 20, 150);
    expect(cut.partials).toBeGreaterThan(0);
    expect(cut.ids).toEqual(expectedIds("priority = 'critical' AND compressor_id = ?", [fx.c1]));
    const words = pageThrough(admin, { q: "pressure", siteId: fx.siteA, kind: "trip", priority: "critical" }, 20, 300);
    expect(words.partials).toBeGreaterThan(0);
    expect(words.ids).toEqual(
      expectedIds("id IN (SELECT rowid FROM events_fts WHERE events_fts MATCH '\"pressure\"*') AND site_id = ? AND kind = 'trip' AND priority = 'critical'", [
        fx.siteA,
      ]),
    );
  });

  it("iterates for the export exactly what the pages return", () => {
    const f: EventFilter = { q: "pressure", siteId: fx.siteA };
    expect([...iterateEvents(db, admin, f, 500)].map((e) => e.id)).toEqual(pageThrough(admin, f, 50).ids);
    expect([...iterateEvents(db, supervisorAll, { kind: "trip" }, 100)].map((e) => e.id)).toEqual(expectedIds("kind = 'trip'"));
  });
});

describe("query plans", () => {
  it("reads one (column, ts) index in order, without sorting, for each kind of filter", () => {
    const cases: [EventFilter, EventScope, string][] = [
      [{}, admin, "events_ts_idx"],
      [{ siteId: 1 }, admin, "events_site_ts_idx"],
      [{ compressorId: 1, kind: "trip", from: T0, to: T0 + 60_000 }, admin, "events_compressor_ts_idx"],
      [{ kind: "trip", priority: "critical" }, { siteIds: [1, 2], includeSiteless: false }, "events_kind_ts_idx"],
      [{ priority: "warning" }, { siteIds: [1, 2], includeSiteless: false }, "events_ts_idx"],
      [{}, { siteIds: [2], includeSiteless: false }, "events_site_ts_idx"],
    ];
    for (const [f, scope, index] of cases) {
      const plan = eventQueryPlan(db, scope, f).join("\n");
      expect(plan).toContain(index);
      expect(plan).not.toContain("TEMP B-TREE");
    }
  });
});
