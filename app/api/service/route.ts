import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { serviceOverview } from "@/lib/service/overview";

export const dynamic = "force-dynamic";

const querySchema = z.object({
  site: z.coerce.number().int().positive().optional(),
  compressor: z.coerce.number().int().positive().optional(),
  q: z.string().trim().max(200).optional(),
});

/** GET ?site=&compressor=&q=: due status, service log (q searches it), planned windows, in the caller's sites. */
export const GET = route(async (request: Request) => {
  const user = await requirePermission("service.view");
  const sp = new URL(request.url).searchParams;
  const f = querySchema.parse({ site: sp.get("site") || undefined, compressor: sp.get("compressor") || undefined, q: sp.get("q") || undefined });
  return NextResponse.json(serviceOverview(getDb(), user.siteIds, f), { headers: { "cache-control": "no-store" } });
});
