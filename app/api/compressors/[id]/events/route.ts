import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { listDeviceEvents } from "@/db/trends";
import { noStore } from "@/app/api/live/hub-address";
import { errorJson, route } from "@/lib/api/route";
import { viewableCompressor } from "../access";

export const dynamic = "force-dynamic";

const querySchema = z.object({
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).optional(),
});

/** Comms losses and restorations, state changes and trips of one compressor, newest first. */
export const GET = route(async (request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const compressor = await viewableCompressor(params);
  if (!compressor) return errorJson(404, "No such compressor.");
  const sp = new URL(request.url).searchParams;
  const q = querySchema.parse({ before: sp.get("before") ?? undefined, limit: sp.get("limit") ?? undefined });
  return NextResponse.json({ events: listDeviceEvents(getDb(), compressor.id, q) }, { headers: noStore });
});
