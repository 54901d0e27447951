import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadLiveState } from "@/db/board";
import { noStore } from "@/app/api/live/hub-address";
import { errorJson, route } from "@/lib/api/route";
import type { CompressorDetail } from "@/shared/board";
import { viewableCompressor } from "./access";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** One compressor's configuration and last known state. */
export const GET = route(async (_request: Request, { params }: Ctx) => {
  const compressor = await viewableCompressor(params);
  if (!compressor) return errorJson(404, "No such compressor.");
  const body: CompressorDetail = { at: Date.now(), compressor, ...loadLiveState(getDb(), compressor.id) };
  return NextResponse.json(body, { headers: noStore });
});
