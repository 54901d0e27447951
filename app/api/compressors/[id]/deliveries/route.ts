import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { deliveryHealth } from "@/db/delivery";
import { noStore } from "@/app/api/live/hub-address";
import { errorJson, route } from "@/lib/api/route";
import { viewableCompressor } from "../access";

export const dynamic = "force-dynamic";

/** Free air delivered per measured fill over the last 90 days, and the delivery advisory's judgement. */
export const GET = route(async (_request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const compressor = await viewableCompressor(params);
  if (!compressor) return errorJson(404, "No such compressor.");
  return NextResponse.json(deliveryHealth(getDb(), compressor.id), { headers: noStore });
});
