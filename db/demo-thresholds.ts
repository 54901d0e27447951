/**
 * Demo limits: a template per demo compressor model and a couple of per-compressor overrides.
 *
 * How the values were chosen. Airkeep's limits sit inside the machine's own protection: they warn while there is still
 * time to act, before the compressor trips itself. The demo machines are simulated (simulator/model/compressor.ts:
 * final-stage trip 200 °C, oil trip 1.0 bar, over-pressure trip at 1.06 × rated); their normal operation was run over
 * 14-day windows in every season (about 100 simulated days per unit) and the limits leave a margin above the highest
 * settled values seen there, so normal running does not trip them, while the scripted cooling-loss and oil-loss faults
 * cross warning and critical minutes before the machine trips:
 *
 *   model        normal max final stage   normal min oil   normal max delivery   cooling fault: warning → trip
 *   Skua 80      137 °C                   (no oil pump)     204.4 bar            ≈ 3 min
 *   Petrel 250   148.8 °C                 3.17 bar          308.1 bar            ≈ 2–3 min
 *   Gannet 320   121.3 °C                 3.15 bar          335.8 bar            ≈ 4 min
 *   Fulmar 450   125.1 °C                 3.20 bar          421.0 bar            ≈ 4 min
 *   all          purifier ≤ 35.7 °C, intake 3.7–26.7 °C
 *
 * The trade values behind them are marked beside each number: "common practice" for rules of thumb of the trade,
 * "from memory" for values recalled without a source at hand; an engineer should check them against the maker's manual.
 */
import { eq } from "drizzle-orm";
import type { AlarmSignal, Priority } from "@/shared/alarm-rules";
import type { Db } from "./client";
import { demoModels } from "./demo-scenario";
import { compressorModels, compressors, thresholdLimits, thresholdSets } from "./schema";

export type DemoLimit = {
  signal: AlarmSignal;
  direction: "high" | "low";
  priority: Priority;
  value: number;
  deadband: number;
  onDelayS: number;
  offDelayS: number;
  enabled?: boolean;
};

type DemoModelName = (typeof demoModels)[number]["name"];

/** Final-stage outlet temperature, °C. */
function finalStage(warning: number, critical: number): DemoLimit[] {
  return [
    // Deadband 5 K and a short on-delay ride out sensor noise (±0.25 K) and the step when a fill starts (common practice).
    { signal: "finalStageC", direction: "high", priority: "warning", value: warning, deadband: 5, onDelayS: 10, offDelayS: 30 },
    { signal: "finalStageC", direction: "high", priority: "critical", value: critical, deadband: 5, onDelayS: 5, offDelayS: 30 },
  ];
}

/** Lubricating oil pressure of pressure-lubricated machines, bar. */
function oil(): DemoLimit[] {
  return [
    // From memory: pressure-lubricated crankcases of this class run at roughly 3–6 bar warm and are protected around
    // 1 bar; warn at 2.0 and call it critical at 1.5, both above the machine's own trip.
    { signal: "oilBar", direction: "low", priority: "warning", value: 2.0, deadband: 0.3, onDelayS: 5, offDelayS: 10 },
    { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 3, offDelayS: 10 },
  ];
}

/** Delivery (bank) pressure, bar: advisory just above the stop pressure, critical just above the rated pressure. */
function delivery(advisory: number, critical: number): DemoLimit[] {
  return [
    // A bank warming up after a fill rises a few bar above the stop pressure; 30 s on-delay and 3 bar deadband (common practice).
    { signal: "deliveryBar", direction: "high", priority: "advisory", value: advisory, deadband: 3, onDelayS: 30, offDelayS: 30 },
    // Critical about 3 % over the rated pressure: below where the final-stage safety valve is commonly set, about 10 % over (from memory).
    { signal: "deliveryBar", direction: "high", priority: "critical", value: critical, deadband: 3, onDelayS: 5, offDelayS: 30 },
  ];
}

/** Purifier and intake (plant-room) temperatures, °C; the same for every demo model. */
const airTreatment: DemoLimit[] = [
  // Molecular-sieve cartridges lose capacity quickly as they warm; makers' capacity tables commonly stop around
  // 45–50 °C (from memory). Slow signal: 5 min on-delay.
  { signal: "purifierC", direction: "high", priority: "advisory", value: 45, deadband: 2, onDelayS: 300, offDelayS: 60 },
  // Permitted ambient for this class of compressor is commonly about +5 to +45 °C (from memory); warn at 40 °C.
  { signal: "intakeC", direction: "high", priority: "warning", value: 40, deadband: 2, onDelayS: 120, offDelayS: 60 },
  // Near 0 °C condensate can freeze in separators and drain lines (common practice); advisory at 2 °C, held 10 min.
  { signal: "intakeC", direction: "low", priority: "advisory", value: 2, deadband: 1, onDelayS: 600, offDelayS: 300 },
];

export const demoModelLimits: Record<DemoModelName, DemoLimit[]> = {
  // Small splash-lubricated 3-stage 225-bar portable: no oil-pressure transmitter, so no oil limits.
  // Rated 225 bar, stop 200 bar. Final stage: normal max 137 °C.
  "Skua 80": [...finalStage(160, 180), ...delivery(210, 232), ...airTreatment],
  // 3-stage 330-bar, runs the hottest of the fleet (normal max 148.8 °C). Rated 330 bar, stop 300 bar.
  "Petrel 250": [...finalStage(165, 185), ...oil(), ...delivery(315, 340), ...airTreatment],
  // 4-stage 350-bar (normal max 121.3 °C). Rated 350 bar, stop 330 bar.
  "Gannet 320": [...finalStage(150, 175), ...oil(), ...delivery(342, 360), ...airTreatment],
  // 4-stage 420-bar (normal max 125.1 °C). Rated 420 bar, stop 414 bar: the bank is seen at up to 421 bar while it warms.
  "Fulmar 450": [...finalStage(150, 175), ...oil(), ...delivery(425, 432), ...airTreatment],
};

/** Per-compressor overrides by device id: a changed value, and an inherited limit switched off. */
export const demoCompressorOverrides: Record<string, DemoLimit[]> = {
  // The dive centre's fill station works through long summer fill sessions close to its template warning; the engineer
  // raised its final-stage warning by 3 K (still 15 K under its critical limit).
  "cr-fill": [{ signal: "finalStageC", direction: "high", priority: "warning", value: 168, deadband: 5, onDelayS: 10, offDelayS: 30 }],
  // The boat unit lives in a heated cabin: the template's low intake-temperature advisory is switched off.
  "cr-boat": [{ signal: "intakeC", direction: "low", priority: "advisory", value: 2, deadband: 1, onDelayS: 600, offDelayS: 300, enabled: false }],
};

export type SeedThresholdsResult = { limits: number; sets: number };

/** Adds the demo limits where they are missing (never overwrites an edited one); running it again changes nothing. */
export function seedDemoThresholds(db: Db, now = Date.now()): SeedThresholdsResult {
  const created = { limits: 0, sets: 0 };
  db.transaction((tx) => {
    const addSet = (scopeType: "model" | "compressor", scopeId: number, limits: readonly DemoLimit[]) => {
      for (const l of limits) {
        const res = tx
          .insert(thresholdLimits)
          .values({
            scopeType,
            scopeId,
            signal: l.signal,
            direction: l.direction,
            priority: l.priority,
            value: l.value,
            deadband: l.deadband,
            onDelayS: l.onDelayS,
            offDelayS: l.offDelayS,
            enabled: l.enabled ?? true,
            updatedAt: now,
          })
          .onConflictDoNothing()
          .run();
        created.limits += res.changes;
      }
      const set = tx
        .insert(thresholdSets)
        .values({ scopeType, scopeId, version: 1, updatedAt: now })
        .onConflictDoNothing()
        .run();
      created.sets += set.changes;
    };

    for (const [name, limits] of Object.entries(demoModelLimits)) {
      const model = tx.select({ id: compressorModels.id }).from(compressorModels).where(eq(compressorModels.name, name)).get();
      if (model) addSet("model", model.id, limits);
    }
    for (const [deviceId, limits] of Object.entries(demoCompressorOverrides)) {
      const c = tx.select({ id: compressors.id }).from(compressors).where(eq(compressors.deviceId, deviceId)).get();
      if (c) addSet("compressor", c.id, limits);
    }
  }, { behavior: "immediate" });
  return created;
}
