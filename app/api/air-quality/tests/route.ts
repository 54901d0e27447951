import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { recordAirTestWithCertificate } from "@/lib/air-quality/uploads";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { getObjectStore } from "@/lib/storage/object-store";
import { airTestInputSchema } from "@/shared/air-quality-schema";
import { hasFile, recordFrom, refusalJson } from "../request";

export const dynamic = "force-dynamic";

/** POST ?record=<air-test JSON>, optionally with the certificate (PDF or image) as multipart/form-data. */
export const POST = route(async (request: Request) => {
  const user = await requirePermission("airquality.record");
  const input = recordFrom(request, airTestInputSchema);
  try {
    const r = await recordAirTestWithCertificate(getDb(), getObjectStore(), user, input, hasFile(request) ? request : null);
    return NextResponse.json({ id: r.id, passed: r.passed, verdict: r.verdict }, { status: 201, headers: { "cache-control": "no-store" } });
  } catch (e) {
    const refused = refusalJson(e);
    if (refused) return refused;
    throw e;
  }
});
