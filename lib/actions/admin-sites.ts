"use server";

import { adminCreateSite, adminUpdateSite } from "@/db/admin";
import { getDb } from "@/db/client";
import { runAction } from "@/lib/api/action";
import { siteInputSchema, siteUpdateSchema } from "@/shared/site-schema";
import { actorOf, asFailures } from "./admin-support";

/** { name, code, timeZone, address } */
export async function createSite(input: unknown) {
  return runAction("admin.sites", siteInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateSite(getDb(), data, actor));
  });
}

/** { id, name, code, timeZone, address } */
export async function updateSite(input: unknown) {
  return runAction("admin.sites", siteUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateSite(getDb(), id, data, actor));
  });
}
