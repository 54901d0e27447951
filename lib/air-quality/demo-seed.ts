import { eq } from "drizzle-orm";
import type { AirTestInput } from "@/shared/air-quality-schema";
import type { AirStandard } from "@/shared/air-standards";
import { DAY_MS } from "@/shared/purifier";
import { saveRating, saveSiteAirSettings } from "@/db/air-quality";
import type { Db } from "@/db/client";
import { demoEmail } from "@/db/demo-scenario";
import { airTests, compressorModels, compressors, sites, users } from "@/db/schema";
import { recordAirTest, recordCartridgeChange } from "./service";

/** Invented cartridge ratings (supplier figures are made up), per demo model. */
const ratings: Record<string, { kind: "water-g" | "air-m3"; value: number; backPressureBar: number }> = {
  "Skua 80": { kind: "water-g", value: 90, backPressureBar: 120 },
  "Petrel 250": { kind: "air-m3", value: 2400, backPressureBar: 150 },
  "Gannet 320": { kind: "water-g", value: 420, backPressureBar: 150 },
  "Fulmar 450": { kind: "water-g", value: 600, backPressureBar: 160 },
};

const siteStandards: Record<string, AirStandard> = { "marrow-bay": "en12021", "heronfold-ridge": "en12021", "cobalt-reef": "cga-e" };

type DemoTest = { daysAgo: number; coPpm?: number; certificateNo: string };
/** Last tests per compressor: HR-2 is overdue, CR-1 failed on CO and passed its retest. */
const tests: Record<string, DemoTest[]> = {
  "mb-main": [{ daysAgo: 35, certificateNo: "AQ-26-0311" }],
  "mb-portable": [{ daysAgo: 62, certificateNo: "AQ-26-0207" }],
  "hr-bay": [{ daysAgo: 48, certificateNo: "HL-5512" }],
  "hr-workshop": [{ daysAgo: 104, certificateNo: "HL-5379" }],
  "cr-fill": [
    { daysAgo: 21, coPpm: 12, certificateNo: "CR-0931" },
    { daysAgo: 18, certificateNo: "CR-0934" },
  ],
  "cr-bank": [{ daysAgo: 55, certificateNo: "CR-0902" }],
  "cr-boat": [{ daysAgo: 70, certificateNo: "CR-0877" }],
};

/**
 * Air-quality settings and history for the demo, written once (skipped when any test exists). Recorded through the same
 * function as the form, so the failed test's alarm is raised and cleared as it would have been.
 */
export function seedDemoAirQuality(db: Db, now = Date.now()): void {
  if (db.select({ id: airTests.id }).from(airTests).limit(1).get()) return;
  const tech = db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, demoEmail("technician"))).get();
  if (!tech) return;
  for (const s of db.select().from(sites).all()) {
    const standard = siteStandards[s.code];
    if (standard) saveSiteAirSettings(db, { siteId: s.id, standard, intervalDays: 91 }, tech.id, now);
  }
  for (const m of db.select().from(compressorModels).all()) {
    const r = ratings[m.name];
    if (r) saveRating(db, { scopeType: "model", scopeId: m.id, rating: { kind: r.kind, value: r.value, refBar: 200, refC: 20, advisoryPct: 80 }, backPressureBar: r.backPressureBar }, tech.id, now);
  }
  const units = db.select({ id: compressors.id, deviceId: compressors.deviceId }).from(compressors).all();
  for (const u of units) {
    for (const t of tests[u.deviceId] ?? []) {
      const at = now - t.daysAgo * DAY_MS;
      const input: AirTestInput = {
        compressorId: u.id,
        sampledAt: at,
        samplePoint: "Fill panel, whip 1",
        fillBar: 300,
        laboratory: "Brightwater Gas Analysis",
        certificateNo: t.certificateNo,
        oxygenPct: 20.9,
        co2Ppm: 420,
        coPpm: t.coPpm ?? 1,
        oilMgM3: 0.05,
        waterValue: 18,
        waterUnit: "mg/m3",
        hydrocarbonsPpm: 4,
        odourOk: true,
        note: t.coPpm ? "Intake moved away from the yard after this result." : "",
      };
      recordAirTest(db, input, tech, null, { now: at + 3_600_000 });
    }
    recordCartridgeChange(db, { compressorId: u.id, changedAt: now - (20 + (u.id % 5) * 12) * DAY_MS, hourMeterH: 800 + u.id * 137, lot: `LOT-${2600 + u.id}`, note: "" }, tech, null, {
      now: now - (20 + (u.id % 5) * 12) * DAY_MS,
    });
  }
}
