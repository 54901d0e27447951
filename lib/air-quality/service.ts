import {
  airUnit,
  airUnits,
  allSiteAirSettings,
  cartridgeUsage,
  cartridgeUsages,
  DEFAULT_INTERVAL_DAYS,
  DEFAULT_STANDARD,
  effectiveRatings,
  getSiteAirSettings,
  insertAirTest,
  insertCartridgeChange,
  latestAirTests,
  listCartridgeChanges,
  notePurifierUse,
  recentUsage,
  specFor,
  type AttachmentNamer,
  type EffectiveRating,
  type UnitInfo,
} from "@/db/air-quality";
import type { Db } from "@/db/client";
import { appendEvent } from "@/db/events";
import type { AirQualityRowDto, AirTestInput, CartridgeChangeInput, CartridgeDto } from "@/shared/air-quality-schema";
import { analyteFields } from "@/shared/air-quality-schema";
import { DO_NOT_USE_AIR } from "@/shared/air-quality-alarms";
import { airStandardLabels, analyteLabels, judgeAirTest, requiredAnalytes, type AirStandard, type AirTestVerdict } from "@/shared/air-standards";
import { cartridgeLevel, cartridgeStatus, DAY_MS, DEFAULT_ADVISORY_PCT, RECENT_WINDOW_MS, type Usage } from "@/shared/purifier";
import { setAirAlarm, type AirAlarmChange } from "./alarm-seam";

export type Actor = { id: number; name: string };

/** A record refused for what it says (400) or names (404); the action turns it into its failure shape. */
export class AirQualityRefusal extends Error {
  constructor(
    readonly status: 400 | 404,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
  }
}

function unitOrMissing(db: Db, compressorId: number, siteIds: number[] | null): UnitInfo {
  const unit = airUnit(db, compressorId);
  // Outside the caller's sites answers like a compressor that does not exist.
  if (!unit || (siteIds !== null && !siteIds.includes(unit.siteId))) throw new AirQualityRefusal(404, "No such compressor.");
  return unit;
}

/** The checks that need the database: the compressor is the caller's, and every analyte the site's standard limits is given. */
export function checkAirTest(db: Db, input: AirTestInput, siteIds: number[] | null): { unit: UnitInfo; standard: AirStandard } {
  const unit = unitOrMissing(db, input.compressorId, siteIds);
  const { standard } = getSiteAirSettings(db, unit.siteId);
  const missing: Record<string, string[]> = {};
  for (const a of requiredAnalytes(standard, input.fillBar)) {
    const field = analyteFields[a];
    if (input[field] == null) missing[field] = [`${airStandardLabels[standard]} limits ${analyteLabels[a].toLowerCase()}: enter the result`];
  }
  if (Object.keys(missing).length) throw new AirQualityRefusal(400, "Some results the standard limits are missing.", missing);
  return { unit, standard };
}

export type RecordedTest = { id: number; passed: boolean; verdict: AirTestVerdict; alarms: AirAlarmChange[] };

/** Judges the record against the site's standard and stores it with its event and alarm changes, all or nothing. */
export function recordAirTest(
  db: Db,
  input: AirTestInput,
  actor: Actor,
  siteIds: number[] | null,
  /** attach runs in the record's transaction once the row exists (links an uploaded certificate); a throw stores nothing. */
  opts: { now?: number; attach?: (tx: Db, airTestId: number) => void } = {},
): RecordedTest {
  const now = opts.now ?? Date.now();
  const { unit, standard } = checkAirTest(db, input, siteIds);
  const verdict = judgeAirTest(standard, input);
  return db.transaction(
    () => {
      const id = insertAirTest(db, {
        compressorId: unit.id,
        siteId: unit.siteId,
        sampledAt: input.sampledAt,
        samplePoint: input.samplePoint,
        fillBar: input.fillBar,
        laboratory: input.laboratory,
        certificateNo: input.certificateNo,
        standard,
        oxygenPct: input.oxygenPct,
        co2Ppm: input.co2Ppm,
        coPpm: input.coPpm,
        oilMgM3: input.oilMgM3,
        waterValue: input.waterValue,
        waterUnit: input.waterUnit,
        hydrocarbonsPpm: input.hydrocarbonsPpm,
        odourOk: input.odourOk,
        passed: verdict.passed,
        verdict,
        note: input.note,
        createdBy: actor.id,
        createdAt: now,
      });
      const failed = verdict.analytes.filter((a) => a.result === "fail" || a.result === "missing").map((a) => analyteLabels[a.analyte].toLowerCase());
      appendEvent(db, {
        ts: now,
        kind: "air-test",
        action: "air.test_recorded",
        priority: verdict.passed ? null : "critical",
        siteId: unit.siteId,
        compressorId: unit.id,
        actor: actor.name,
        text: `${actor.name} recorded air test ${input.certificateNo} (${input.laboratory}) for ${unit.name}: ${
          verdict.passed ? "passed" : `FAILED (${failed.join(", ")})`
        } against ${airStandardLabels[standard]}`,
        details: { airTestId: id, passed: verdict.passed, standard },
      });
      opts.attach?.(db, id);
      const latest = latestAirTests(db).get(unit.id);
      const alarms: AirAlarmChange[] = [];
      // Only the newest sample decides: recording an old certificate late does not clear or raise anything newer.
      if (latest?.id === id) {
        const unitRef = { id: unit.id, siteId: unit.siteId, name: unit.name };
        const f = setAirAlarm(db, unitRef, "air-test-failed", !verdict.passed, now, verdict.passed ? "" : `air test ${input.certificateNo} failed (${failed.join(", ")}). ${DO_NOT_USE_AIR}`);
        if (f) alarms.push(f);
        const { intervalDays } = getSiteAirSettings(db, unit.siteId);
        const o = setAirAlarm(db, unitRef, "air-test-overdue", now > input.sampledAt + intervalDays * DAY_MS, now, "the air test is overdue");
        if (o) alarms.push(o);
      }
      return { id, passed: verdict.passed, verdict, alarms };
    },
    { behavior: "immediate" },
  );
}

export function recordCartridgeChange(
  db: Db,
  input: CartridgeChangeInput,
  actor: Actor,
  siteIds: number[] | null,
  opts: { now?: number; attach?: (tx: Db, changeId: number, where: { compressorId: number; siteId: number }) => void } = {},
): { id: number; alarms: AirAlarmChange[] } {
  const now = opts.now ?? Date.now();
  const unit = unitOrMissing(db, input.compressorId, siteIds);
  return db.transaction(
    () => {
      const id = insertCartridgeChange(db, {
        compressorId: unit.id,
        siteId: unit.siteId,
        changedAt: input.changedAt,
        hourMeterH: input.hourMeterH,
        lot: input.lot,
        note: input.note,
        createdBy: actor.id,
        createdAt: now,
      });
      opts.attach?.(db, id, { compressorId: unit.id, siteId: unit.siteId });
      appendEvent(db, {
        ts: now,
        kind: "service",
        action: "air.cartridge_changed",
        siteId: unit.siteId,
        compressorId: unit.id,
        actor: actor.name,
        text: `${actor.name} changed the purifier cartridge of ${unit.name} (lot ${input.lot}, ${input.hourMeterH} h)`,
        details: { cartridgeChangeId: id },
      });
      const unitRef = { id: unit.id, siteId: unit.siteId, name: unit.name };
      const alarms = [setAirAlarm(db, unitRef, "cartridge-spent", false, now), setAirAlarm(db, unitRef, "cartridge-advisory", false, now)].filter(
        (c): c is AirAlarmChange => c !== null,
      );
      return { id, alarms };
    },
    { behavior: "immediate" },
  );
}

/** Cartridge figures for one unit (the incremental sum is brought up to date on the way). */
export function cartridgeFor(
  db: Db,
  unit: UnitInfo,
  rated: EffectiveRating | null,
  now: number,
  name?: AttachmentNamer,
  summed?: { usage: Usage; sinceTs: number },
): CartridgeDto {
  const lastChange = listCartridgeChanges(db, unit.id, 1, name)[0] ?? null;
  if (!rated) return { status: null, level: null, advisoryPct: DEFAULT_ADVISORY_PCT, sinceTs: lastChange?.changedAt ?? null, lastChange, ratingSource: null, backPressureBar: unit.backPressureBar };
  const spec = specFor(unit, rated);
  const { usage, sinceTs } = summed ?? cartridgeUsage(db, unit, spec, now);
  const from = Math.max(now - RECENT_WINDOW_MS, sinceTs);
  const recent = recentUsage(db, unit.id, spec, from, now + 1);
  const status = cartridgeStatus(spec, usage, recent, now - from, now);
  notePurifierUse(db, unit.id, status.usedPct, rated.advisoryPct);
  return {
    status,
    level: cartridgeLevel(status.usedPct, rated.advisoryPct),
    advisoryPct: rated.advisoryPct,
    sinceTs: lastChange?.changedAt ?? null,
    lastChange,
    ratingSource: rated.source,
    backPressureBar: unit.backPressureBar,
  };
}

/** Every compressor in scope by next test due, overdue first. */
export function airQualityOverview(db: Db, siteIds: number[] | null, now = Date.now(), onlyCompressorId?: number): AirQualityRowDto[] {
  const settings = allSiteAirSettings(db);
  const latest = latestAirTests(db);
  const ratingOf = effectiveRatings(db);
  const units = airUnits(db, siteIds).filter((u) => onlyCompressorId === undefined || u.id === onlyCompressorId);
  const rated = new Map(units.map((u) => [u.id, ratingOf(u)]));
  const summed = cartridgeUsages(
    db,
    units.flatMap((u) => {
      const r = rated.get(u.id);
      return r ? [{ unit: u, spec: specFor(u, r) }] : [];
    }),
    now,
  );
  const rows = units.map((u): AirQualityRowDto => {
    const s = settings.get(u.siteId) ?? { standard: DEFAULT_STANDARD, intervalDays: DEFAULT_INTERVAL_DAYS };
    const last = latest.get(u.id) ?? null;
    const nextDueAt = (last?.sampledAt ?? u.createdAt) + s.intervalDays * DAY_MS;
    return {
      compressorId: u.id,
      compressorName: u.name,
      inService: u.inService,
      siteId: u.siteId,
      siteName: u.siteName,
      timeZone: u.timeZone,
      standard: s.standard,
      intervalDays: s.intervalDays,
      lastTest: last,
      nextDueAt,
      overdueDays: Math.max(0, Math.floor((now - nextDueAt) / DAY_MS)),
      cartridge: cartridgeFor(db, u, rated.get(u.id) ?? null, now, undefined, summed.get(u.id)),
    };
  });
  return rows.sort((a, b) => (a.nextDueAt ?? 0) - (b.nextDueAt ?? 0) || a.compressorName.localeCompare(b.compressorName));
}

/** Raises and clears the overdue-test and cartridge alarms of every compressor in service (run every minute by the mail process). */
export function runAirQualityWatch(db: Db, now = Date.now()): AirAlarmChange[] {
  const out: AirAlarmChange[] = [];
  for (const row of airQualityOverview(db, null, now)) {
    if (!row.inService) continue;
    const unit = { id: row.compressorId, siteId: row.siteId, name: row.compressorName };
    const overdue = row.nextDueAt !== null && now > row.nextDueAt;
    const lvl = row.cartridge.level;
    const pct = row.cartridge.status ? `${row.cartridge.status.usedPct.toFixed(0)} %` : "";
    db.transaction(
      () => {
        for (const c of [
          setAirAlarm(db, unit, "air-test-overdue", overdue, now, `air test overdue by ${row.overdueDays} day(s)`),
          setAirAlarm(db, unit, "cartridge-spent", lvl === "warning", now, `purifier cartridge at ${pct} of its water capacity`),
          setAirAlarm(db, unit, "cartridge-advisory", lvl === "advisory", now, `purifier cartridge at ${pct} of its water capacity`),
        ])
          if (c) out.push(c);
      },
      { behavior: "immediate" },
    );
  }
  return out;
}
