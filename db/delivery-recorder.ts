import type { Db } from "@/db/client";
import { deliveryAdvisorySettings, deliveryUnits, type DeliveryUnit, insertFillDelivery, lastFillShares } from "@/db/delivery";
import { clearConditionAlarm, raiseConditionAlarm } from "@/db/alarm-conditions";
import type { AlarmTransition } from "@/db/alarm-transitions";
import { conditionKey } from "@/shared/alarm-conditions";
import { deliveryAdvisory, type DeliveryAdvisorySettings, FillTracker } from "@/shared/delivery-health";
import { runStateCode, type ReadingInput } from "@/shared/telemetry";

const FAMILY = "delivery-low";
const SUBJECT = "median";
export const DELIVERY_ALARM_KEY = conditionKey(FAMILY, SUBJECT);
const pct = (share: number) => `${Math.round(share * 100)} %`;

export type DeliveryRecorder = {
  /**
   * Follows a batch of readings (arrival order; older ones than seen are skipped), stores each fill measured and
   * judges the advisory on its compressor. Call inside the transaction that stores the readings.
   */
  onReadings(rows: readonly ReadingInput[]): { fills: number; transitions: AlarmTransition[] };
  stats(): { fills: number; readings: number };
};

/**
 * Delivery health as readings arrive: one FillTracker per compressor (shared/delivery-health.ts), the units' banks and
 * setpoints re-read at most once a minute. Used by the ingester's commit and by the simulator's backfill.
 */
export function createDeliveryRecorder(db: Db, opts: { alarms: boolean; refreshMs?: number; now?: () => number }): DeliveryRecorder {
  const clock = opts.now ?? Date.now;
  const refreshMs = opts.refreshMs ?? 60_000;
  const trackers = new Map<number, FillTracker>();
  let units = new Map<number, DeliveryUnit>();
  let settings: DeliveryAdvisorySettings = deliveryAdvisorySettings(db);
  let loadedAt = -Infinity;
  const st = { fills: 0, readings: 0 };
  const running = runStateCode.running;

  function refresh(force = false): void {
    const now = clock();
    if (now - loadedAt < (force ? 1_000 : refreshMs)) return;
    units = deliveryUnits(db);
    settings = deliveryAdvisorySettings(db);
    loadedAt = now;
  }

  return {
    onReadings(rows) {
      refresh();
      const transitions: AlarmTransition[] = [];
      let fills = 0;
      for (const r of rows) {
        // a compressor added since the last look is measured from its first readings
        if (!units.has(r.compressorId)) refresh(true);
        const unit = units.get(r.compressorId);
        if (!unit || !(unit.bankVolumeL > 0)) continue;
        let tracker = trackers.get(r.compressorId);
        if (!tracker) trackers.set(r.compressorId, (tracker = new FillTracker()));
        st.readings++;
        const f = tracker.add({ ts: r.ts, running: r.runState === running && r.motorOn === 1, deliveryBar: r.deliveryBar, intakeC: r.intakeC }, unit);
        if (!f || !insertFillDelivery(db, r.compressorId, f)) continue;
        fills++;
        if (!opts.alarms) continue;
        const judged = deliveryAdvisory(lastFillShares(db, r.compressorId, settings.fills), settings);
        if (judged.median === null) continue;
        const c = { compressorId: r.compressorId, family: FAMILY, subject: SUBJECT, ts: f.endTs, value: judged.median };
        const t = judged.low
          ? raiseConditionAlarm(
              db,
              {
                ...c,
                priority: "advisory",
                limitValue: settings.minShare,
                detail: `median delivery of the last fills ${pct(judged.median)} of rated, below ${pct(settings.minShare)} (worn valves, a leaking separator drain or a slipping belt are usual causes)`,
              },
              clock(),
            )
          : clearConditionAlarm(db, { ...c, detail: `median delivery back to ${pct(judged.median)} of rated` }, clock());
        if (t) transitions.push(t);
      }
      st.fills += fills;
      return { fills, transitions };
    },
    stats: () => ({ ...st }),
  };
}
