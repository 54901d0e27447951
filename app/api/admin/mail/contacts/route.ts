import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { contactsOverview } from "@/db/contacts";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { escalateAfterMinFromEnv } from "@/lib/notify/config";

export const dynamic = "force-dynamic";

/** Contacts, notification rules, the on-call rota and who is on call now, with the sites and accounts the forms offer. */
export const GET = route(async () => {
  await requirePermission("admin.mail");
  return NextResponse.json(contactsOverview(getDb(), { defaultEscalateAfterMin: escalateAfterMinFromEnv() }), {
    headers: { "cache-control": "no-store" },
  });
});
