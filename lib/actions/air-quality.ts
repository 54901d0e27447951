"use server";

// Air-test records and cartridge changes carry a file, so they go through route handlers (app/api/air-quality/*),
// which stream it into the store; the settings below have none.

import { revalidatePath } from "next/cache";
import { saveRating, saveSiteAirSettings, airUnit } from "@/db/air-quality";
import { writeAudit } from "@/db/audit";
import { getDb } from "@/db/client";
import { ActionFailure, runAction } from "@/lib/api/action";
import { purifierRatingInputSchema, siteAirSettingsInputSchema } from "@/shared/air-quality-schema";

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
