import type { Statement } from "better-sqlite3";
import {
  defaultDeliveryAdvisory,
  deliveryAdvisory,
  type DeliveryAdvisorySettings,
  type DeliveryHealthResponse,
  type DeliveryMonthRow,
  median,
  type FillDelivery,
  type FillUnit,
} from "@/shared/delivery-health";
import type { Db } from "./client";

// Delivery health's storage: measured fills (fill_deliveries), the units' settings for measuring, and the figures read
// back for the compressor page and the monthly report.

export type DeliveryUnit = FillUnit & { compressorId: number };

type Prepared = {
  insert: Statement<[number, number, number, number, number, number, number, number, number, number]>;
  lastShares: Statement<[number, number], { share: number }>;
  units: Statement<[], DeliveryUnit>;
};
const prepared = new WeakMap<Db, Prepared>();

function statements(db: Db): Prepared {
  let s = prepared.get(db);
  if (!s) {
    s = {
      insert: db.$client.prepare(
        `INSERT OR IGNORE INTO fill_deliveries
           (compressor_id, start_ts, end_ts, from_bar, to_bar, bank_c, free_air_l, delivery_lpm, rated_lpm, share)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      ),
      lastShares: db.$client.prepare(
        `SELECT share FROM (SELECT share, end_ts FROM fill_deliveries WHERE compressor_id = ? ORDER BY end_ts DESC LIMIT ?) ORDER BY end_ts`,
      ),
      units: db.$client.prepare(
        `SELECT c.id AS compressorId, c.bank_volume_l AS bankVolumeL, c.stop_pressure_bar AS stopPressureBar,
                c.restart_pressure_bar AS restartPressureBar, m.rated_delivery_lpm AS ratedDeliveryLpm
         FROM compressors c JOIN compressor_models m ON m.id = c.model_id`,
      ),
    };
    prepared.set(db, s);
  }
  return s;
}

/** Every compressor's bank and setpoints, for measuring its fills. */
export function deliveryUnits(db: Db): Map<number, DeliveryUnit> {
  return new Map(statements(db).units.all().map((u) => [u.compressorId, u]));
}

/** Stores a measured fill (once: a replay of the same fill is ignored); returns whether it was new. */
export function insertFillDelivery(db: Db, compressorId: number, f: FillDelivery): boolean {
  return (
    statements(db).insert.run(compressorId, f.startTs, f.endTs, f.fromBar, f.toBar, f.bankC, f.freeAirL, f.deliveryLpm, f.ratedLpm, f.share)
      .changes > 0
  );
}

/** Shares of rated delivery of the compressor's last `n` fills, oldest first. */
export function lastFillShares(db: Db, compressorId: number, n: number): number[] {
  return statements(db).lastShares.all(compressorId, n).map((r) => r.share);
}

const SETTING_FILLS = "delivery.advisory_fills";
const SETTING_SHARE = "delivery.advisory_min_share";

/** The advisory's settings from `settings` (keys delivery.advisory_fills, delivery.advisory_min_share), else the defaults. */
export function deliveryAdvisorySettings(db: Db): DeliveryAdvisorySettings {
  const rows = db.$client
    .prepare("SELECT key, value FROM settings WHERE key IN (?, ?)")
    .all(SETTING_FILLS, SETTING_SHARE) as { key: string; value: string }[];
  const get = (k: string) => Number(rows.find((r) => r.key === k)?.value);
  const fills = get(SETTING_FILLS);
  const share = get(SETTING_SHARE);
  return {
    fills: Number.isInteger(fills) && fills >= 1 && fills <= 100 ? fills : defaultDeliveryAdvisory.fills,
    minShare: Number.isFinite(share) && share > 0 && share < 1 ? share : defaultDeliveryAdvisory.minShare,
  };
}

/** The compressor's measured fills since `fromTs`, oldest first (at most `limit`, the newest ones). */
export function listFillDeliveries(db: Db, compressorId: number, fromTs: number, limit = 500): FillDelivery[] {
  return db.$client
    .prepare(
      `SELECT * FROM (
         SELECT start_ts AS startTs, end_ts AS endTs, from_bar AS fromBar, to_bar AS toBar, bank_c AS bankC,
                free_air_l AS freeAirL, delivery_lpm AS deliveryLpm, rated_lpm AS ratedLpm, share
         FROM fill_deliveries WHERE compressor_id = ? AND end_ts >= ? ORDER BY end_ts DESC LIMIT ?)
       ORDER BY endTs`,
    )
    .all(compressorId, fromTs, limit) as FillDelivery[];
}

/** The compressor page's delivery-health figures: fills of the last `days` days and the advisory's judgement. */
export function deliveryHealth(db: Db, compressorId: number, now = Date.now(), days = 90): DeliveryHealthResponse {
  const settings = deliveryAdvisorySettings(db);
  const judged = deliveryAdvisory(lastFillShares(db, compressorId, settings.fills), settings);
  return { fills: listFillDeliveries(db, compressorId, now - days * 86_400_000), settings, ...judged };
}

/** Median delivery of each compressor's fills that ended within its window [from, to) (its site's month). */
export function deliveryMonthRows(
  db: Db,
  units: readonly { compressorId: number; compressorName: string; siteName: string; from: number; to: number }[],
): DeliveryMonthRow[] {
  const { minShare } = deliveryAdvisorySettings(db);
  const stmt = db.$client.prepare(
    "SELECT delivery_lpm, share, rated_lpm FROM fill_deliveries WHERE compressor_id = ? AND end_ts >= ? AND end_ts < ?",
  );
  return units.map((u) => {
    const rows = stmt.raw().all(u.compressorId, u.from, u.to) as [number, number, number][];
    const medianShare = median(rows.map((r) => r[1]));
    return {
      compressorId: u.compressorId,
      compressorName: u.compressorName,
      siteName: u.siteName,
      fills: rows.length,
      medianLpm: median(rows.map((r) => r[0])),
      medianShare,
      ratedLpm: rows.at(-1)?.[2] ?? null,
      low: medianShare !== null && medianShare < minShare,
    };
  });
}
