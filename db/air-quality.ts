import type { Statement } from "better-sqlite3";
import { and, desc, eq, inArray } from "drizzle-orm";
import type { AirTestDto, CartridgeChangeDto, PurifierRatingInput, SiteAirSettingsInput } from "@/shared/air-quality-schema";
import type { AirStandard, AirTestVerdict } from "@/shared/air-standards";
import {
  addBucket,
  emptyUsage,
  HOUR_MS,
  type CartridgeRating,
  type PurifierSpec,
  type Usage,
} from "@/shared/purifier";
import { getAttachment } from "./attachments";
import type { Db } from "./client";
import { airTests, cartridgeChanges, compressorModels, compressors, purifierRatings, purifierUsage, siteAirSettings, sites, users } from "./schema";

export const DEFAULT_INTERVAL_DAYS = 91;
export const DEFAULT_STANDARD: AirStandard = "en12021";

export type SiteAirSettings = { standard: AirStandard; intervalDays: number };

export function getSiteAirSettings(db: Db, siteId: number): SiteAirSettings {
  const r = db.select().from(siteAirSettings).where(eq(siteAirSettings.siteId, siteId)).get();
  return r ? { standard: r.standard, intervalDays: r.intervalDays } : { standard: DEFAULT_STANDARD, intervalDays: DEFAULT_INTERVAL_DAYS };
}

export function allSiteAirSettings(db: Db): Map<number, SiteAirSettings> {
  const out = new Map<number, SiteAirSettings>();
  for (const r of db.select().from(siteAirSettings).all()) out.set(r.siteId, { standard: r.standard, intervalDays: r.intervalDays });
  return out;
}

export function saveSiteAirSettings(db: Db, input: SiteAirSettingsInput, userId: number, now = Date.now()): void {
  db.insert(siteAirSettings)
    .values({ ...input, updatedAt: now, updatedBy: userId })
    .onConflictDoUpdate({ target: siteAirSettings.siteId, set: { standard: input.standard, intervalDays: input.intervalDays, updatedAt: now, updatedBy: userId } })
    .run();
}

export type UnitInfo = {
  id: number;
  name: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  modelId: number;
  ratedDeliveryLpm: number;
  backPressureBar: number;
  inService: boolean;
  createdAt: number;
};

const unitColumns = {
  id: compressors.id,
  name: compressors.name,
  siteId: compressors.siteId,
  siteName: sites.name,
  timeZone: sites.timeZone,
  modelId: compressors.modelId,
  ratedDeliveryLpm: compressorModels.ratedDeliveryLpm,
  backPressureBar: compressorModels.backPressureBar,
  inService: compressors.inService,
  createdAt: compressors.createdAt,
};

export function airUnits(db: Db, siteIds: number[] | null): UnitInfo[] {
  const q = db
    .select(unitColumns)
    .from(compressors)
    .innerJoin(sites, eq(sites.id, compressors.siteId))
    .innerJoin(compressorModels, eq(compressorModels.id, compressors.modelId));
  return (siteIds === null ? q : q.where(inArray(compressors.siteId, siteIds.length ? siteIds : [-1]))).orderBy(sites.name, compressors.name).all();
}

export function airUnit(db: Db, compressorId: number): UnitInfo | null {
  return (
    db
      .select(unitColumns)
      .from(compressors)
      .innerJoin(sites, eq(sites.id, compressors.siteId))
      .innerJoin(compressorModels, eq(compressorModels.id, compressors.modelId))
      .where(eq(compressors.id, compressorId))
      .get() ?? null
  );
}

export type EffectiveRating = { rating: CartridgeRating; advisoryPct: number; source: "model" | "compressor" };

/** The compressor's own rating if it has one, else its model's; null when neither is rated. */
export function effectiveRatings(db: Db): (unit: Pick<UnitInfo, "id" | "modelId">) => EffectiveRating | null {
  const rows = db.select().from(purifierRatings).all();
  const byKey = new Map(rows.map((r) => [`${r.scopeType}:${r.scopeId}`, r]));
  return (u) => {
    const c = byKey.get(`compressor:${u.id}`);
    const r = c ?? byKey.get(`model:${u.modelId}`);
    if (!r) return null;
    return { rating: { kind: r.kind, value: r.value, refBar: r.refBar, refC: r.refC }, advisoryPct: r.advisoryPct, source: c ? "compressor" : "model" };
  };
}

export function saveRating(db: Db, input: PurifierRatingInput, userId: number, now = Date.now()): void {
  db.transaction(
    () => {
      const key = and(eq(purifierRatings.scopeType, input.scopeType), eq(purifierRatings.scopeId, input.scopeId));
      if (input.rating === null) db.delete(purifierRatings).where(key).run();
      else
        db.insert(purifierRatings)
          .values({ scopeType: input.scopeType, scopeId: input.scopeId, ...input.rating, updatedAt: now, updatedBy: userId })
          .onConflictDoUpdate({ target: [purifierRatings.scopeType, purifierRatings.scopeId], set: { ...input.rating, updatedAt: now, updatedBy: userId } })
          .run();
      if (input.scopeType === "model" && input.backPressureBar !== undefined)
        db.update(compressorModels).set({ backPressureBar: input.backPressureBar }).where(eq(compressorModels.id, input.scopeId)).run();
    },
    { behavior: "immediate" },
  );
}

export function specFor(unit: Pick<UnitInfo, "ratedDeliveryLpm" | "backPressureBar">, r: EffectiveRating): PurifierSpec {
  return { ratedDeliveryLpm: unit.ratedDeliveryLpm, backPressureBar: unit.backPressureBar, rating: r.rating };
}

const specKey = (s: PurifierSpec) => JSON.stringify([s.ratedDeliveryLpm, s.backPressureBar]);

// ---- Cartridge use, summed incrementally over the 1-hour rollups ----

type BucketRow = [runS: number, pcSum: number, pcN: number, pbSum: number, pbN: number, dSum: number, dN: number];

const statements = new WeakMap<object, { buckets: Statement }>();
function prepared(db: Db) {
  let s = statements.get(db.$client);
  if (!s) {
    s = {
      buckets: db.$client
        .prepare(
          `SELECT run_s, purifier_c_sum, purifier_c_n, purifier_bar_sum, purifier_bar_n, delivery_bar_sum, delivery_bar_n
             FROM readings_1h WHERE compressor_id = ? AND bucket_ts >= ? AND bucket_ts < ? AND run_s > 0`,
        )
        .raw(),
    };
    statements.set(db.$client, s);
  }
  return s;
}

/** Milliseconds spent reading rollups vs computing water, for `npm run bench:purifier`. */
export const purifierTimings = { sqlMs: 0, computeMs: 0, rows: 0 };

/** Adds the 1-hour buckets in [from, to) to `u`. */
export function addHourBuckets(db: Db, u: Usage, compressorId: number, spec: PurifierSpec, from: number, to: number): void {
  const t0 = performance.now();
  const rows = prepared(db).buckets.all(compressorId, from, to) as BucketRow[];
  const t1 = performance.now();
  const b = { runS: 0, purifierC: null as number | null, purifierBar: null as number | null, deliveryBar: null as number | null };
  for (const r of rows) {
    b.runS = r[0];
    b.purifierC = r[2] > 0 ? r[1] / r[2] : null;
    b.purifierBar = r[4] > 0 ? r[3] / r[4] : null;
    b.deliveryBar = r[6] > 0 ? r[5] / r[6] : null;
    addBucket(u, spec, b);
  }
  purifierTimings.sqlMs += t1 - t0;
  purifierTimings.computeMs += performance.now() - t1;
  purifierTimings.rows += rows.length;
}


type UsageRow = typeof purifierUsage.$inferSelect;
export type UsageItem = { unit: Pick<UnitInfo, "id">; spec: PurifierSpec };

/** Above this many units to sum from scratch, one sequential scan of the hour table beats an index walk per unit. */
const SCAN_ABOVE = 50;

const scanStatements = new WeakMap<object, Statement>();
function scanStatement(db: Db): Statement {
  let s = scanStatements.get(db.$client);
  if (!s) {
    s = db.$client
      .prepare(
        `SELECT compressor_id, bucket_ts, run_s, purifier_c_sum, purifier_c_n, purifier_bar_sum, purifier_bar_n, delivery_bar_sum, delivery_bar_n
           FROM readings_1h WHERE bucket_ts >= ? AND bucket_ts < ? AND run_s > 0`,
      )
      .raw();
    scanStatements.set(db.$client, s);
  }
  return s;
}

function addRow(u: Usage, spec: PurifierSpec, r: readonly number[], o: number): void {
  addBucket(u, spec, {
    runS: r[o]!,
    purifierC: r[o + 2]! > 0 ? r[o + 1]! / r[o + 2]! : null,
    purifierBar: r[o + 4]! > 0 ? r[o + 3]! / r[o + 4]! : null,
    deliveryBar: r[o + 6]! > 0 ? r[o + 5]! / r[o + 6]! : null,
  });
}

/**
 * Water taken up since each unit's last change (from the start of that hour: an hour of over-count at most, on the safe
 * side). Complete hours are summed once and kept in purifier_usage, in one IMMEDIATE transaction for all units; the
 * hour under way is added live and not kept.
 */
export function cartridgeUsages(db: Db, items: readonly UsageItem[], now: number): Map<number, { usage: Usage; sinceTs: number }> {
  const doneBefore = Math.floor(now / HOUR_MS) * HOUR_MS;
  const ids = items.map((i) => i.unit.id);
  const lastChanges = new Map(
    (db.$client.prepare("SELECT compressor_id, MAX(changed_at) FROM cartridge_changes GROUP BY compressor_id").raw().all() as [number, number][]),
  );
  const plan = (rows: Map<number, UsageRow>) =>
    items.map(({ unit, spec }) => {
      const since = lastChanges.get(unit.id) ?? 0;
      const key = specKey(spec);
      const row = rows.get(unit.id);
      const fresh = !row || row.sinceTs !== since || row.specKey !== key;
      const usage: Usage = fresh ? emptyUsage() : { waterG: row.waterG, runS: row.runS, freeAirM3: row.freeAirM3 };
      const from = fresh ? Math.floor(since / HOUR_MS) * HOUR_MS : row.throughTs;
      return { unit, spec, since, key, fresh, usage, from };
    });
  const readRows = () =>
    new Map(
      (ids.length ? db.select().from(purifierUsage).where(inArray(purifierUsage.compressorId, ids)).all() : []).map((r) => [r.compressorId, r]),
    );
  let plans = plan(readRows());
  if (plans.some((p) => p.from < doneBefore)) {
    plans = db.transaction(
      () => {
        const ps = plan(readRows()); // again under the write lock: another process may have summed meanwhile
        const todo = ps.filter((p) => p.from < doneBefore);
        const fresh = todo.filter((p) => p.fresh);
        const scanned = new Set<number>();
        if (fresh.length > SCAN_ABOVE) {
          const t0 = performance.now();
          const minFrom = Math.min(...fresh.map((p) => p.from));
          const byId = new Map(fresh.map((p) => [p.unit.id, p]));
          const rows = scanStatement(db).all(minFrom, doneBefore) as number[][];
          const t1 = performance.now();
          for (const r of rows) {
            const p = byId.get(r[0]!);
            if (p && r[1]! >= p.from) addRow(p.usage, p.spec, r, 2);
          }
          purifierTimings.sqlMs += t1 - t0;
          purifierTimings.computeMs += performance.now() - t1;
          purifierTimings.rows += rows.length;
          for (const p of fresh) scanned.add(p.unit.id);
        }
        const upsert = db.$client.prepare(
          `INSERT INTO purifier_usage (compressor_id, since_ts, through_ts, water_g, run_s, free_air_m3, spec_key, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)
           ON CONFLICT (compressor_id) DO UPDATE SET since_ts = excluded.since_ts, through_ts = excluded.through_ts, water_g = excluded.water_g,
             run_s = excluded.run_s, free_air_m3 = excluded.free_air_m3, spec_key = excluded.spec_key, updated_at = excluded.updated_at`,
        );
        for (const p of todo) {
          if (!scanned.has(p.unit.id)) addHourBuckets(db, p.usage, p.unit.id, p.spec, p.from, doneBefore);
          upsert.run(p.unit.id, p.since, doneBefore, p.usage.waterG, p.usage.runS, p.usage.freeAirM3, p.key, now);
        }
        return ps;
      },
      { behavior: "immediate" },
    );
  }
  const out = new Map<number, { usage: Usage; sinceTs: number }>();
  for (const p of plans) {
    addHourBuckets(db, p.usage, p.unit.id, p.spec, Math.max(doneBefore, Math.floor(p.since / HOUR_MS) * HOUR_MS), doneBefore + HOUR_MS);
    out.set(p.unit.id, { usage: p.usage, sinceTs: p.since });
  }
  return out;
}

export function cartridgeUsage(db: Db, unit: Pick<UnitInfo, "id">, spec: PurifierSpec, now: number): { usage: Usage; sinceTs: number } {
  return cartridgeUsages(db, [{ unit, spec }], now).get(unit.id)!;
}

/** Keeps the last computed use beside the sums, for the board's badge. */
export function notePurifierUse(db: Db, compressorId: number, usedPct: number, advisoryPct: number): void {
  db.update(purifierUsage).set({ usedPct, advisoryPct }).where(eq(purifierUsage.compressorId, compressorId)).run();
}

/** The recent window's duty, for predictions. */
export function recentUsage(db: Db, unitId: number, spec: PurifierSpec, from: number, to: number): Usage {
  const u = emptyUsage();
  addHourBuckets(db, u, unitId, spec, Math.floor(from / HOUR_MS) * HOUR_MS, to);
  return u;
}

// ---- Records ----

export type NewAirTest = typeof airTests.$inferInsert;

export function insertAirTest(db: Db, row: NewAirTest): number {
  return db.insert(airTests).values(row).returning({ id: airTests.id }).get().id;
}

export function latestAirTests(db: Db): Map<number, { id: number; sampledAt: number; passed: boolean }> {
  const rows = db.$client
    .prepare(
      `SELECT t.compressor_id AS compressorId, t.id, t.sampled_at AS sampledAt, t.passed FROM air_tests t
        WHERE t.id = (SELECT id FROM air_tests x WHERE x.compressor_id = t.compressor_id ORDER BY sampled_at DESC, id DESC LIMIT 1)`,
    )
    .all() as { compressorId: number; id: number; sampledAt: number; passed: number }[];
  return new Map(rows.map((r) => [r.compressorId, { id: r.id, sampledAt: r.sampledAt, passed: r.passed === 1 }]));
}

export type AttachmentNamer = (id: number | null) => { id: number; name: string } | null;
/** A stored file's id and name (failed uploads have no file to link to). */
const storedFile = (db: Db): AttachmentNamer => (id) => {
  const a = id ? getAttachment(db, id) : null;
  return a && a.status === "stored" ? { id: a.id, name: a.name } : null;
};

export function listAirTests(db: Db, f: { compressorId?: number; siteIds: number[] | null; from?: number; to?: number; limit?: number }, name: AttachmentNamer = storedFile(db)): AirTestDto[] {
  const where = [];
  if (f.compressorId) where.push(eq(airTests.compressorId, f.compressorId));
  if (f.siteIds) where.push(inArray(airTests.siteId, f.siteIds.length ? f.siteIds : [-1]));
  const rows = db
    .select({ t: airTests, compressorName: compressors.name, createdBy: users.name })
    .from(airTests)
    .innerJoin(compressors, eq(compressors.id, airTests.compressorId))
    .leftJoin(users, eq(users.id, airTests.createdBy))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(airTests.sampledAt), desc(airTests.id))
    .limit(f.limit ?? 50)
    .all();
  return rows.map(({ t, compressorName, createdBy }) => ({
    id: t.id,
    compressorId: t.compressorId,
    compressorName,
    siteId: t.siteId,
    sampledAt: t.sampledAt,
    samplePoint: t.samplePoint,
    fillBar: t.fillBar,
    laboratory: t.laboratory,
    certificateNo: t.certificateNo,
    standard: t.standard,
    passed: t.passed,
    verdict: t.verdict as AirTestVerdict,
    certificate: name(t.certificateAttachmentId),
    note: t.note,
    createdBy: createdBy ?? "",
    createdAt: t.createdAt,
  }));
}

export function insertCartridgeChange(db: Db, row: typeof cartridgeChanges.$inferInsert): number {
  const id = db.insert(cartridgeChanges).values(row).returning({ id: cartridgeChanges.id }).get().id;
  db.delete(purifierUsage).where(eq(purifierUsage.compressorId, row.compressorId)).run();
  return id;
}

export function listCartridgeChanges(db: Db, compressorId: number, limit = 20, name: AttachmentNamer = storedFile(db)): CartridgeChangeDto[] {
  return db
    .select({ c: cartridgeChanges, createdBy: users.name })
    .from(cartridgeChanges)
    .leftJoin(users, eq(users.id, cartridgeChanges.createdBy))
    .where(eq(cartridgeChanges.compressorId, compressorId))
    .orderBy(desc(cartridgeChanges.changedAt))
    .limit(limit)
    .all()
    .map(({ c, createdBy }) => ({
      id: c.id,
      compressorId: c.compressorId,
      changedAt: c.changedAt,
      hourMeterH: c.hourMeterH,
      lot: c.lot,
      note: c.note,
      photo: name(c.photoAttachmentId),
      createdBy: createdBy ?? "",
    }));
}

/** Every test sampled before `to`, oldest first (a month's due dates depend on the last test before it). */
export function airTestsBefore(db: Db, to: number): { compressorId: number; siteId: number; sampledAt: number; passed: boolean }[] {
  return (
    db.$client
      .prepare(`SELECT compressor_id AS compressorId, site_id AS siteId, sampled_at AS sampledAt, passed FROM air_tests WHERE sampled_at < ? ORDER BY sampled_at`)
      .all(to) as { compressorId: number; siteId: number; sampledAt: number; passed: number }[]
  ).map((r) => ({ ...r, passed: r.passed === 1 }));
}

export function cartridgeChangesBetween(db: Db, from: number, to: number): { compressorId: number; siteId: number; changedAt: number }[] {
  return db.$client
    .prepare(`SELECT compressor_id AS compressorId, site_id AS siteId, changed_at AS changedAt FROM cartridge_changes WHERE changed_at >= ? AND changed_at < ?`)
    .all(from, to) as { compressorId: number; siteId: number; changedAt: number }[];
}

/** Each model with its cartridge rating (if any) and back-pressure valve setting, for the settings form. */
export function modelRatings(db: Db) {
  const ratings = new Map(
    db
      .select()
      .from(purifierRatings)
      .where(eq(purifierRatings.scopeType, "model"))
      .all()
      .map((r) => [r.scopeId, r]),
  );
  return db
    .select({ id: compressorModels.id, name: compressorModels.name, backPressureBar: compressorModels.backPressureBar })
    .from(compressorModels)
    .orderBy(compressorModels.name)
    .all()
    .map((m) => {
      const r = ratings.get(m.id);
      return {
        modelId: m.id,
        modelName: m.name,
        backPressureBar: m.backPressureBar,
        rating: r ? { kind: r.kind, value: r.value, refBar: r.refBar, refC: r.refC, advisoryPct: r.advisoryPct } : null,
      };
    });
}

/** One scope's own rating row (no inheritance), for the override form. */
export function ownRating(db: Db, scopeType: "model" | "compressor", scopeId: number) {
  const r = db.select().from(purifierRatings).where(and(eq(purifierRatings.scopeType, scopeType), eq(purifierRatings.scopeId, scopeId))).get();
  return r ? { kind: r.kind, value: r.value, refBar: r.refBar, refC: r.refC, advisoryPct: r.advisoryPct } : null;
}
