import type { Statement } from "better-sqlite3";
import type { BoardCompressor, BoardData, BoardSite } from "@/shared/board";
import type { LiveCompressor } from "@/shared/live";
import { runStateFromCode } from "@/shared/telemetry";
import type { Db } from "./client";
import { serviceBadges, serviceDueList } from "./service";

// Reads for the board and the compressor page: configuration joined with the last known state
// (compressor_state, written by the ingester). Plain prepared statements: these run on every board load.

type StateColumns = {
  stateId: number | null;
  online: number | null;
  receivedAt: number | null;
  ts: number | null;
  runState: number | null;
  motorOn: number | null;
  deliveryBar: number | null;
  stage1Bar: number | null;
  stage2Bar: number | null;
  stage3Bar: number | null;
  stage4Bar: number | null;
  stage1C: number | null;
  stage2C: number | null;
  stage3C: number | null;
  stage4C: number | null;
  oilBar: number | null;
  purifierC: number | null;
  intakeC: number | null;
  hourMeterH: number | null;
  starts: number | null;
  tripCode: number | null;
  fillRateBarPerMin: number | null;
  updatedAt: number | null;
};

const stateSelect = `st.compressor_id AS stateId, st.online AS online, st.received_at AS receivedAt, st.ts AS ts,
  st.run_state AS runState, st.motor_on AS motorOn, st.delivery_bar AS deliveryBar,
  st.stage1_bar AS stage1Bar, st.stage2_bar AS stage2Bar, st.stage3_bar AS stage3Bar, st.stage4_bar AS stage4Bar,
  st.stage1_c AS stage1C, st.stage2_c AS stage2C, st.stage3_c AS stage3C, st.stage4_c AS stage4C,
  st.oil_bar AS oilBar, st.purifier_c AS purifierC, st.intake_c AS intakeC, st.hour_meter_h AS hourMeterH,
  st.starts AS starts, st.trip_code AS tripCode, st.fill_rate_bar_per_min AS fillRateBarPerMin, st.updated_at AS updatedAt`;

type BoardRow = StateColumns & {
  id: number;
  name: string;
  siteId: number;
  modelName: string;
  stages: number;
  ratedPressureBar: number;
  stopPressureBar: number;
  restartPressureBar: number;
  bankVolumeL: number;
  inService: number;
  cartridgePct: number | null;
  cartridgeAdvisoryPct: number | null;
};

function trimNulls(values: (number | null)[]): (number | null)[] {
  let n = values.length;
  while (n > 0 && values[n - 1] == null) n--;
  return values.slice(0, n);
}

/** The socket's shape, from a compressor_state row (null when the compressor has never been heard of). */
export function stateToLive(compressorId: number, r: StateColumns): LiveCompressor | null {
  if (r.stateId == null) return null;
  return {
    compressorId,
    online: r.online === 1,
    receivedAt: r.receivedAt,
    ts: r.ts,
    runState: r.runState == null ? null : runStateFromCode(r.runState),
    motorOn: r.motorOn == null ? null : r.motorOn === 1,
    deliveryBar: r.deliveryBar,
    stageBar: trimNulls([r.stage1Bar, r.stage2Bar, r.stage3Bar, r.stage4Bar]),
    stageC: trimNulls([r.stage1C, r.stage2C, r.stage3C, r.stage4C]),
    oilBar: r.oilBar,
    purifierC: r.purifierC,
    intakeC: r.intakeC,
    hourMeterH: r.hourMeterH,
    starts: r.starts,
    tripCode: r.tripCode,
    fillRateBarPerMin: r.fillRateBarPerMin == null ? null : Math.round(r.fillRateBarPerMin * 100) / 100,
  };
}

const statements = new WeakMap<Db, { compressors: Statement<[{ scope: string | null }], BoardRow>; sites: Statement<[{ scope: string | null }], BoardSite>; one: Statement<[number], StateColumns> }>();

function prepared(db: Db) {
  let s = statements.get(db);
  if (!s) {
    // $scope is a JSON array of site ids, or NULL for every site.
    s = {
      compressors: db.$client.prepare(
        `SELECT c.id AS id, c.name AS name, c.site_id AS siteId, m.name AS modelName, m.stages AS stages,
                m.rated_pressure_bar AS ratedPressureBar, c.stop_pressure_bar AS stopPressureBar,
                c.restart_pressure_bar AS restartPressureBar, c.bank_volume_l AS bankVolumeL, c.in_service AS inService, pu.used_pct AS cartridgePct, pu.advisory_pct AS cartridgeAdvisoryPct, ${stateSelect}
         FROM compressors c
         JOIN sites si ON si.id = c.site_id
         JOIN compressor_models m ON m.id = c.model_id
         LEFT JOIN compressor_state st ON st.compressor_id = c.id
         LEFT JOIN purifier_usage pu ON pu.compressor_id = c.id
         WHERE $scope IS NULL OR c.site_id IN (SELECT value FROM json_each($scope))
         ORDER BY si.name, c.name`,
      ) as Statement<[{ scope: string | null }], BoardRow>,
      sites: db.$client.prepare(
        `SELECT id, name, code, time_zone AS timeZone FROM sites
         WHERE $scope IS NULL OR id IN (SELECT value FROM json_each($scope)) ORDER BY name`,
      ) as Statement<[{ scope: string | null }], BoardSite>,
      one: db.$client.prepare(`SELECT ${stateSelect} FROM compressor_state st WHERE st.compressor_id = ?`) as Statement<
        [number],
        StateColumns
      >,
    };
    statements.set(db, s);
  }
  return s;
}

/** Every site and compressor in scope (siteIds null: every site) with its last known state. */
export function loadBoard(db: Db, siteIds: number[] | null, now = Date.now()): BoardData {
  const scope = siteIds ? JSON.stringify(siteIds) : null;
  const s = prepared(db);
  const badges = serviceBadges(serviceDueList(db, now, siteIds));
  const compressors: BoardCompressor[] = s.compressors.all({ scope }).map((r) => ({
    id: r.id,
    name: r.name,
    siteId: r.siteId,
    modelName: r.modelName,
    stages: r.stages,
    ratedPressureBar: r.ratedPressureBar,
    stopPressureBar: r.stopPressureBar,
    restartPressureBar: r.restartPressureBar,
    bankVolumeL: r.bankVolumeL,
    inService: r.inService === 1,
    service: badges.get(r.id)?.status === "ok" ? null : (badges.get(r.id) ?? null),
    live: stateToLive(r.id, r),
    liveStamp: r.updatedAt ?? 0,
    cartridge: r.cartridgePct == null || r.cartridgeAdvisoryPct == null ? null : { usedPct: r.cartridgePct, advisoryPct: r.cartridgeAdvisoryPct },
  }));
  return { at: now, sites: s.sites.all({ scope }), compressors };
}

/** Last known state of one compressor, with the time it was written. */
export function loadLiveState(db: Db, compressorId: number): { live: LiveCompressor | null; liveStamp: number } {
  const r = prepared(db).one.get(compressorId);
  return r ? { live: stateToLive(compressorId, r), liveStamp: r.updatedAt ?? 0 } : { live: null, liveStamp: 0 };
}
