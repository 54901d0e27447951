"use server";

import { adminCreateModel, adminUpdateModel } from "@/db/admin";
import { getDb } from "@/db/client";
import { runAction } from "@/lib/api/action";
import { compressorModelInputSchema, compressorModelUpdateSchema } from "@/shared/compressor-schema";
import { actorOf, asFailures } from "./admin-support";

/** { name, maker, stages, ratedDeliveryLpm, ratedPressureBar } */
export async function createCompressorModel(input: unknown) {
  return runAction("admin.compressors", compressorModelInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateModel(getDb(), data, actor));
  });
}

/** { id, name, maker, stages, ratedDeliveryLpm, ratedPressureBar } */
export async function updateCompressorModel(input: unknown) {
  return runAction("admin.compressors", compressorModelUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateModel(getDb(), id, data, actor));
  });
}
