"use server";

import { revalidatePath } from "next/cache";
import { saveRating, saveSiteAirSettings, airUnit } from "@/db/air-quality";
import { writeAudit } from "@/db/audit";
import { getDb } from "@/db/client";
import { AirQualityRefusal, recordAirTest, recordCartridgeChange } from "@/lib/air-quality/service";
import { ActionFailure, runAction } from "@/lib/api/action";
import {
  airTestInputSchema,
  cartridgeChangeInputSchema,
  purifierRatingInputSchema,
  siteAirSettingsInputSchema,
} from "@/shared/air-quality-schema";

function refusals<T>(run: () => T): T {
  try {
    return run();
  } catch (e) {
    if (e instanceof AirQualityRefusal) throw new ActionFailure(e.status, e.message, e.fieldErrors);
    throw e;
  }
}

/** An air-test record (see airTestInputSchema); judged against the site's standard; nothing is stored if anything is refused. */
export async function recordAirTestAction(input: unknown) {
  return runAction("airquality.record", airTestInputSchema, input, (data, user) => {
    const r = refusals(() => recordAirTest(getDb(), data, { id: user.id, name: user.name }, user.siteIds));
    revalidatePath("/air-quality");
    return { id: r.id, passed: r.passed, verdict: r.verdict };
  });
}

/** { compressorId, changedAt, hourMeterH, lot, note } — resets the cartridge count. */
export async function recordCartridgeChangeAction(input: unknown) {
  return runAction("airquality.record", cartridgeChangeInputSchema, input, (data, user) => {
    const r = refusals(() => recordCartridgeChange(getDb(), data, { id: user.id, name: user.name }, user.siteIds));
    revalidatePath("/air-quality");
    return { id: r.id };
  });
}

/** { siteId, standard, intervalDays } — administrators only. */
export async function saveSiteAirSettingsAction(input: unknown) {
  return runAction("admin.sites", siteAirSettingsInputSchema, input, (data, user) => {
    const db = getDb();
    saveSiteAirSettings(db, data, user.id);
    writeAudit(db, { actorUserId: user.id, actor: user.name, action: "air.site_settings", targetType: "site", targetId: data.siteId, siteId: data.siteId, details: { ...data } });
    revalidatePath("/air-quality");
    return { ok: true };
  });
}

/** { scopeType: "model" | "compressor", scopeId, rating: {kind, value, refBar, refC, advisoryPct} | null, backPressureBar? } */
export async function savePurifierRatingAction(input: unknown) {
  return runAction("admin.compressors", purifierRatingInputSchema, input, (data, user) => {
    const db = getDb();
    if (data.scopeType === "compressor" && !airUnit(db, data.scopeId)) throw new ActionFailure(404, "No such compressor.");
    saveRating(db, data, user.id);
    writeAudit(db, {
      actorUserId: user.id,
      actor: user.name,
      action: "air.purifier_rating",
      targetType: data.scopeType,
      targetId: data.scopeId,
      compressorId: data.scopeType === "compressor" ? data.scopeId : null,
      details: { rating: data.rating, backPressureBar: data.backPressureBar ?? null },
    });
    revalidatePath("/air-quality");
    return { ok: true };
  });
}
