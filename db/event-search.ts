import type Database from "better-sqlite3";
import type { Priority } from "@/shared/alarm-rules";
import type { EventDto } from "@/shared/event-schema";
import type { Role } from "@/shared/roles";
import type { Db } from "./client";

// Searching and paging the event log with plain prepared statements (cached per connection), because at a million
// rows the plan matters and is chosen here on purpose.
//
// Paging is keyset on (ts, id), newest first: stable under inserts and ties on ts, as fast on page 500 as on page 1.
// `ts <= ?` bounds the index range and `(ts < ? OR id < ?)` drops the tied rows already shown.
//
// One index drives every scan in (ts DESC, id DESC) order, so no sort is needed: (compressor_id, ts) when a
// compressor is chosen, else (site_id, ts) for one site, else (kind, ts), else (ts) — each ends with the rowid.
// The caller's site scope, priority and any second filter are row checks (written `+col` so the planner never picks
// their index and then sorts every row of a two-site scope).
//
// With search words, FTS5 supplies the matching rowids newest first through one statement per request, opened just
// above the ids of the first batch (FTS5 reads a doclist cheaply only from its ends, and a prefix word merges its
// doclists once per statement, so statements must be few). The driving index is read in growing batches of ids
// (index-only, aggregated in SQL into one string) and each id is checked against the matches pulled so far; only the
// hits are fetched as rows. If the first batch does not fill the page and the words have at most FTS_DRIVE_MAX
// matches in all, those matches drive the rest of the page: their rows are fetched, filtered and ordered at once.
//
// Every request does bounded work: a scan that has read `scanBudget` index entries without filling the page stops
// and returns what it found with `partial: true` and a cursor where it stopped, so a rare combination of filters
// costs the person a "search older" click instead of a slow server. Every row is still returned exactly once.

export type EventScope = {
  /** Sites the caller may see; null = every site. */
  siteIds: number[] | null;
  /** Events that belong to no site (sign-ins, accounts, fleet configuration). Only administrators see them. */
  includeSiteless: boolean;
};

/** Site-less events carry people's sign-ins and account changes: only administrators read them. */
export function eventScopeOf(user: { role: Role; siteIds: number[] | null }): EventScope {
  return { siteIds: user.siteIds, includeSiteless: user.role === "admin" };
}

export type EventFilter = {
  /** Words as a person types them; turned into a safe FTS5 query by ftsQuery(). */
  q?: string;
  siteId?: number;
  compressorId?: number;
  priority?: Priority;
  kind?: string;
  /** UTC ms, inclusive. */
  from?: number;
  /** UTC ms, exclusive. */
  to?: number;
};

export type EventCursor = { ts: number; id: number };

export type EventPage = {
  events: EventDto[];
  /** Where the next (older) page starts; null at the end. */
  next: EventCursor | null;
  /** The scan budget ran out before the page filled: older matches may exist beyond `next`. */
  partial: boolean;
};

/** Words with at most this many matches drive the query from the full-text index. */
export const FTS_DRIVE_MAX = 4000;
export const MAX_PAGE = 500;
/** Index entries one request may read while looking for a page (with and without words). */
export const SCAN_BUDGET = { words: 25_000, rows: 20_000 } as const;
const MAX_TERMS = 16;
const MAX_TERM_CHARS = 64;

/**
 * Turns what a person typed into an FTS5 query that cannot be a syntax error or an injection: every
 * whitespace-separated word becomes a quoted string (inner quotes doubled), so operators, colons, brackets
 * and column filters are plain text; the words are ANDed; the last word is a prefix unless the input ends in a
 * space (or its last token is a single character). A quoted string is tokenised like the text, so
 * "viewer@airkeep.demo" matches that e-mail as a phrase. Returns null when nothing searchable is left.
 */
export function ftsQuery(input: string | null | undefined): string | null {
  if (!input) return null;
  const words = input
    .split(/\s+/)
    .filter((w) => /[\p{L}\p{N}]/u.test(w))
    .slice(0, MAX_TERMS)
    .map((w) => w.slice(0, MAX_TERM_CHARS));
  if (!words.length) return null;
  // A prefix of one letter or digit ("TA-3") would merge a large share of the index and means little: keep it exact.
  const lastToken = /[\p{L}\p{N}]+(?=[^\p{L}\p{N}]*$)/u.exec(words[words.length - 1]!)?.[0] ?? "";
  const prefixLast = !/\s$/.test(input) && [...lastToken].length >= 2;
  return words.map((w, i) => `"${w.replace(/"/g, '""')}"${prefixLast && i === words.length - 1 ? "*" : ""}`).join(" ");
}

// ---------------------------------------------------------------------------------------------------------------

const statements = new WeakMap<Database.Database, Map<string, Database.Statement>>();

function prepare(db: Db, sql: string, mode: "rows" | "pluck" = "rows"): Database.Statement {
  let cache = statements.get(db.$client);
  if (!cache) statements.set(db.$client, (cache = new Map()));
  const key = `${mode}\n${sql}`;
  let stmt = cache.get(key);
  if (!stmt) {
    stmt = db.$client.prepare(sql);
    if (mode === "pluck") stmt.pluck(true);
    cache.set(key, stmt);
  }
  return stmt;
}

type Clause = { where: string[]; params: unknown[] };

const whereSql = (c: Clause) => (c.where.length ? ` WHERE ${c.where.join(" AND ")}` : "");

/** The filters as the caller's scope narrows them; null when nothing can match. */
function effective(scope: EventScope, f: EventFilter): EventFilter | null {
  if (scope.siteIds && !scope.includeSiteless && scope.siteIds.length === 0) return null;
  if (f.siteId !== undefined && scope.siteIds && !scope.siteIds.includes(f.siteId)) return null;
  if (f.from !== undefined && f.to !== undefined && f.from >= f.to) return null;
  // A person limited to one site reads that site's slice of the (site_id, ts) index.
  if (f.siteId === undefined && f.compressorId === undefined && scope.siteIds?.length === 1 && !scope.includeSiteless) {
    return { ...f, siteId: scope.siteIds[0] };
  }
  return f;
}

type Driver = { index: string; column: "compressor_id" | "site_id" | "kind" | null; value: unknown };

/** The one index that drives the scan: the narrowest equality filter with a (column, ts) index. */
function driverOf(f: EventFilter): Driver {
  if (f.compressorId !== undefined) return { index: "events_compressor_ts_idx", column: "compressor_id", value: f.compressorId };
  if (f.siteId !== undefined) return { index: "events_site_ts_idx", column: "site_id", value: f.siteId };
  if (f.kind !== undefined) return { index: "events_kind_ts_idx", column: "kind", value: f.kind };
  return { index: "events_ts_idx", column: null, value: null };
}

function keyset(c: Clause, after: EventCursor | undefined): void {
  if (!after) return;
  c.where.push("e.ts <= ?", "(e.ts < ? OR e.id < ?)");
  c.params.push(after.ts, after.ts, after.id);
}

/** Conditions the driving index answers by itself: its column, the time range and the keyset position. */
function indexConditions(f: EventFilter, d: Driver, after: EventCursor | undefined): Clause {
  const c: Clause = { where: [], params: [] };
  if (d.column) {
    c.where.push(`e.${d.column} = ?`);
    c.params.push(d.value);
  }
  if (f.from !== undefined) {
    c.where.push("e.ts >= ?");
    c.params.push(f.from);
  }
  if (f.to !== undefined) {
    c.where.push("e.ts < ?");
    c.params.push(f.to);
  }
  keyset(c, after);
  return c;
}

/** Conditions checked on each row. */
function rowConditions(scope: EventScope, f: EventFilter, d: Driver): Clause {
  const c: Clause = { where: [], params: [] };
  if (scope.siteIds === null) {
    if (!scope.includeSiteless) c.where.push("+e.site_id IS NOT NULL");
  } else {
    const inScope = "+e.site_id IN (SELECT value FROM json_each(?))";
    c.where.push(scope.includeSiteless ? `(${inScope} OR +e.site_id IS NULL)` : inScope);
    c.params.push(JSON.stringify(scope.siteIds));
  }
  if (f.compressorId !== undefined && d.column !== "compressor_id") {
    c.where.push("+e.compressor_id = ?");
    c.params.push(f.compressorId);
  }
  if (f.siteId !== undefined && d.column !== "site_id") {
    c.where.push("+e.site_id = ?");
    c.params.push(f.siteId);
  }
  if (f.kind !== undefined && d.column !== "kind") {
    c.where.push("+e.kind = ?");
    c.params.push(f.kind);
  }
  if (f.priority !== undefined) {
    c.where.push("+e.priority = ?");
    c.params.push(f.priority);
  }
  return c;
}

const join = (...cs: Clause[]): Clause => ({ where: cs.flatMap((c) => c.where), params: cs.flatMap((c) => c.params) });

const selectNamed = `SELECT e.id, e.ts, e.kind, e.action, e.priority, e.site_id AS siteId, s.name AS siteName, s.time_zone AS timeZone,
  e.compressor_id AS compressorId, c.name AS compressorName, e.alarm_id AS alarmId, e.actor, e.text
FROM events e LEFT JOIN sites s ON s.id = e.site_id LEFT JOIN compressors c ON c.id = e.compressor_id`;

type Found = { rows: EventDto[]; stoppedAt: EventCursor | null };

/** The position of the `n`-th entry of the driving index from `after` (index-only), or null if there are fewer. */
function nthPosition(db: Db, f: EventFilter, d: Driver, after: EventCursor | undefined, n: number): EventCursor | null {
  const c = indexConditions(f, d, after);
  const sql = `SELECT e.ts, e.id FROM events e INDEXED BY ${d.index}${whereSql(c)} ORDER BY e.ts DESC, e.id DESC LIMIT 1 OFFSET ?`;
  return (prepare(db, sql).get(...c.params, n - 1) as EventCursor | undefined) ?? null;
}

/** Without words: one statement, the driving index in order, stopped by LIMIT (and by the budget's end). */
function rowPage(db: Db, scope: EventScope, f: EventFilter, after: EventCursor | undefined, want: number, budget: number): Found {
  const d = driverOf(f);
  const rowConds = rowConditions(scope, f, d);
  // With row checks a rare combination could read the whole index: end the scan at the budget's last entry.
  const end = rowConds.where.length ? nthPosition(db, f, d, after, budget) : null;
  const c = join(indexConditions(f, d, after), rowConds);
  if (end) {
    c.where.push("e.ts >= ?", "(e.ts > ? OR e.id >= ?)");
    c.params.push(end.ts, end.ts, end.id);
  }
  // The scan is a subquery so that the joins for names cannot change its plan.
  const inner = `SELECT e.id FROM events e INDEXED BY ${d.index}${whereSql(c)} ORDER BY e.ts DESC, e.id DESC LIMIT ?`;
  const sql = `${selectNamed} WHERE e.id IN (${inner}) ORDER BY e.ts DESC, e.id DESC`;
  const rows = prepare(db, sql).all(...c.params, want) as EventDto[];
  return { rows, stoppedAt: rows.length < want ? end : null };
}

/** Rows for a set of ids (a JSON array): filtered, ordered, bounded by the keyset position. */
function rowsByIds(db: Db, idsJson: string, scope: EventScope, f: EventFilter, after: EventCursor | undefined, limit: number): EventDto[] {
  if (limit <= 0) return [];
  const none: Driver = { index: "", column: null, value: null };
  const c = join({ where: ["e.id IN (SELECT value FROM json_each(?))"], params: [idsJson] }, indexConditions(f, none, after), rowConditions(scope, f, none));
  return prepare(db, `${selectNamed}${whereSql(c)} ORDER BY e.ts DESC, e.id DESC LIMIT ?`).all(...c.params, limit) as EventDto[];
}

/**
 * The rowids matching the words, learnt as the scan needs them: every match in [low, high] is known. FTS5 reads a
 * doclist cheaply only from its ends, and a prefix word merges its doclists once per statement, so the matches
 * come from one statement per request, newest rowid first, opened just above the first candidate. A candidate
 * above `high` (an event recorded late) widens the window upwards with a second, bounded statement.
 * The statement is open only within one synchronous call: close() at its end.
 */
class Matches {
  readonly ids = new Set<number>();
  low = Number.POSITIVE_INFINITY;
  high = Number.NEGATIVE_INFINITY;
  /** Nothing matches below `low`. */
  done = false;
  private it: IterableIterator<unknown> | null = null;
  private static readonly SLACK = 2048;

  constructor(
    private readonly db: Db,
    private readonly match: string,
  ) {}

  private pull(n: number): void {
    if (this.done) return;
    this.it ??= prepare(this.db, "SELECT rowid FROM events_fts WHERE events_fts MATCH ? AND rowid < ? ORDER BY rowid DESC", "pluck").iterate(
      this.match,
      this.low,
    );
    for (let i = 0; i < n; i++) {
      const r = this.it.next();
      if (r.done) {
        this.done = true;
        this.it = null;
        this.low = Number.NEGATIVE_INFINITY;
        return;
      }
      this.ids.add(r.value as number);
      this.low = r.value as number;
    }
  }

  /** Learns the matches in (high, top], at most `limit` of them; true when that got them all. */
  private widen(top: number, limit = -1): boolean {
    const above = prepare(
      this.db,
      "SELECT rowid FROM events_fts WHERE events_fts MATCH ? AND rowid > ? AND rowid <= ? ORDER BY rowid DESC LIMIT ?",
      "pluck",
    ).all(this.match, this.high, top, limit) as number[];
    for (const id of above) this.ids.add(id);
    const complete = limit < 0 || above.length < limit;
    if (complete) this.high = top;
    return complete;
  }

  /** Makes sure matches up to `top` will be known: sets the window's upper end, or widens it once per batch. */
  cover(top: number): void {
    if (this.high === Number.NEGATIVE_INFINITY) {
      this.high = top + Matches.SLACK;
      this.low = this.high + 1;
    } else if (top > this.high) {
      this.widen(top + Matches.SLACK);
    }
  }

  /** Whether `id` matches, learning as much as that takes. */
  has(id: number): boolean {
    this.cover(id);
    while (!this.done && this.low > id) this.pull(1024);
    return this.ids.has(id);
  }

  /** Reads on until more than FTS_DRIVE_MAX matches are known; true when fewer exist (so they can drive). */
  fewEnough(): boolean {
    while (!this.done && this.ids.size <= FTS_DRIVE_MAX) this.pull(1024);
    if (!this.done || this.ids.size > FTS_DRIVE_MAX) return false;
    return this.widen(Number.MAX_SAFE_INTEGER, FTS_DRIVE_MAX + 1 - this.ids.size) && this.ids.size <= FTS_DRIVE_MAX;
  }

  json(): string {
    return JSON.stringify([...this.ids]);
  }

  close(): void {
    this.it?.return?.();
    this.it = null;
  }
}

/**
 * With words: the driving index is read in growing batches of (id, ts) — index-only, aggregated in SQL into one
 * JSON string — and each id is checked against the matches; only the hits are fetched as rows. If the first batch
 * does not fill the page and the words turn out to have few matches, those matches drive the rest of the page.
 */
function wordPage(db: Db, match: string, scope: EventScope, f: EventFilter, after: EventCursor | undefined, want: number, budget: number): Found {
  const m = new Matches(db, match);
  try {
    const d = driverOf(f);
    const out: EventDto[] = [];
    let position = after;
    let scanned = 0;
    let batch = 1024;
    for (;;) {
      const k = Math.min(batch, budget - scanned);
      if (k <= 0) return { rows: out, stoppedAt: position ?? null };
      const c = indexConditions(f, d, position);
      const sql = `SELECT json_group_array(id ORDER BY ts DESC, id DESC) AS ids, min(ts) AS lastTs
        FROM (SELECT e.id, e.ts FROM events e INDEXED BY ${d.index}${whereSql(c)} ORDER BY e.ts DESC, e.id DESC LIMIT ?)`;
      const got = prepare(db, sql).get(...c.params, k) as { ids: string; lastTs: number | null };
      const ids = JSON.parse(got.ids) as number[];
      if (!ids.length) return { rows: out, stoppedAt: null };
      scanned += ids.length;
      m.cover(Math.max(...ids));
      const hits = ids.filter((id) => m.has(id));
      if (hits.length) out.push(...rowsByIds(db, JSON.stringify(hits), scope, f, undefined, hits.length));
      if (out.length >= want) return { rows: out.slice(0, want), stoppedAt: null };
      if (ids.length < k) return { rows: out, stoppedAt: null };
      position = { ts: got.lastTs!, id: ids[ids.length - 1]! };
      if (batch === 1024 && m.fewEnough()) {
        return { rows: [...out, ...rowsByIds(db, m.json(), scope, f, position, want - out.length)], stoppedAt: null };
      }
      batch = Math.min(batch * 4, 16_384);
    }
  } finally {
    m.close();
  }
}

export type PageOptions = { after?: EventCursor; limit?: number; scanBudget?: number };

/** One page of events, newest first, with the cursor of the next (older) page if there is one. */
export function searchEvents(db: Db, scope: EventScope, filter: EventFilter, opts: PageOptions = {}): EventPage {
  const limit = Math.min(MAX_PAGE, Math.max(1, Math.floor(opts.limit ?? 50)));
  const f = effective(scope, filter);
  const match = ftsQuery(filter.q);
  if (!f || (filter.q?.trim() && !match)) return { events: [], next: null, partial: false };
  // One row more than asked tells whether an older page exists.
  const want = limit + 1;
  const found = match
    ? wordPage(db, match, scope, f, opts.after, want, opts.scanBudget ?? SCAN_BUDGET.words)
    : rowPage(db, scope, f, opts.after, want, opts.scanBudget ?? SCAN_BUDGET.rows);
  const events = found.rows.slice(0, limit);
  const last = events[events.length - 1];
  if (found.rows.length > limit && last) return { events, next: { ts: last.ts, id: last.id }, partial: false };
  return { events, next: found.stoppedAt, partial: found.stoppedAt !== null };
}

/**
 * Every matching event, newest first, `chunk` rows at a time by keyset. No statement stays open between chunks,
 * so a slow reader of an export never holds the connection.
 */
export function* iterateEventChunks(db: Db, scope: EventScope, filter: EventFilter, chunk = 2000): Generator<EventDto[]> {
  const f = effective(scope, filter);
  const match = ftsQuery(filter.q);
  if (!f || (filter.q?.trim() && !match)) return;
  let after: EventCursor | undefined;
  for (;;) {
    const found = match
      ? wordPage(db, match, scope, f, after, chunk, SCAN_BUDGET.words * 4)
      : rowPage(db, scope, f, after, chunk, SCAN_BUDGET.rows * 4);
    if (found.rows.length) yield found.rows;
    const last = found.rows[found.rows.length - 1];
    if (found.rows.length >= chunk && last) after = { ts: last.ts, id: last.id };
    else if (found.stoppedAt) after = found.stoppedAt;
    else return;
  }
}

export function* iterateEvents(db: Db, scope: EventScope, filter: EventFilter, chunk = 2000): Generator<EventDto> {
  for (const rows of iterateEventChunks(db, scope, filter, chunk)) yield* rows;
}

/** EXPLAIN QUERY PLAN of a page without words (the statement whose plan matters), for the benchmark and tests. */
export function eventQueryPlan(db: Db, scope: EventScope, filter: EventFilter): string[] {
  const f = effective(scope, filter);
  if (!f) return [];
  const d = driverOf(f);
  const c = join(indexConditions(f, d, undefined), rowConditions(scope, f, d));
  const sql = `SELECT e.id FROM events e INDEXED BY ${d.index}${whereSql(c)} ORDER BY e.ts DESC, e.id DESC LIMIT 51`;
  return (db.$client.prepare(`EXPLAIN QUERY PLAN ${sql}`).all(...c.params) as { detail: string }[]).map((r) => r.detail);
}
