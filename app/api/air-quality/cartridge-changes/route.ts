import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { recordCartridgeChangeWithPhoto } from "@/lib/air-quality/uploads";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { getObjectStore } from "@/lib/storage/object-store";
import { cartridgeChangeInputSchema } from "@/shared/air-quality-schema";
import { hasFile, recordFrom, refusalJson } from "../request";

export const dynamic = "force-dynamic";

/** POST ?record=<cartridge-change JSON>, optionally with a photo as multipart/form-data. */
export const POST = route(async (request: Request) => {
  const user = await requirePermission("airquality.record");
  const input = recordFrom(request, cartridgeChangeInputSchema);
  try {
    const r = await recordCartridgeChangeWithPhoto(getDb(), getObjectStore(), user, input, hasFile(request) ? request : null);
    return NextResponse.json({ id: r.id }, { status: 201, headers: { "cache-control": "no-store" } });
  } catch (e) {
    const refused = refusalJson(e);
    if (refused) return refused;
    throw e;
  }
});
