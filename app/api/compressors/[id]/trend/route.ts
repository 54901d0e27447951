import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { readTrend } from "@/db/trends";
import { errorJson, route } from "@/lib/api/route";
import { trendSignalSchema, trendSpanSchema } from "@/shared/board";
import { viewableCompressor } from "../access";

export const dynamic = "force-dynamic";

// finalStageC names the last fitted stage's outlet (as alarm limits do); `end` (ms) shows a past window, e.g. around an alarm.
const querySchema = z.object({
  signal: z.union([trendSignalSchema, z.literal("finalStageC")]),
  span: trendSpanSchema,
  end: z.coerce.number().int().positive().optional(),
});

/**
 * GET ?signal=deliveryBar&span=15m|1h|6h|24h|7d|30d|90d|1y[&end=ms] — at most ~1000 points of [t, mean, min, max] in bar / °C.
 * `source` says where they came from: raw readings up to 6 h, 1-minute rollups up to 7 d, 1-hour rollups beyond.
 */
export const GET = route(async (request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const compressor = await viewableCompressor(params);
  if (!compressor) return errorJson(404, "No such compressor.");
  const url = new URL(request.url);
  const q = querySchema.parse({
    signal: url.searchParams.get("signal") ?? "deliveryBar",
    span: url.searchParams.get("span") ?? "6h",
    end: url.searchParams.get("end") ?? undefined,
  });
  const signal = q.signal === "finalStageC" ? trendSignalSchema.parse(`stage${compressor.stages}C`) : q.signal;
  const body = readTrend(getDb(), compressor.id, signal, q.span, Math.min(Date.now(), q.end ?? Infinity));
  // Short spans change by the second; long ones barely within a minute.
  const maxAge = q.span === "15m" || q.span === "1h" ? 5 : 30;
  return NextResponse.json(body, { headers: { "cache-control": `private, max-age=${maxAge}` } });
});
