import { getDb } from "@/db/client";
import { getCompressor } from "@/db/compressors";
import { readBodyLimited } from "@/lib/api/body";
import { errorJson, route } from "@/lib/api/route";
import { crossOriginRefusal } from "@/lib/api/same-origin";
import { inScope, requirePermission } from "@/lib/auth/current-user";
import { BacktestRefusal, runBacktest } from "@/lib/backtest/run";
import { backtestRequestSchema, type BacktestMessage } from "@/shared/backtest";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** Backtests running in this process; more wait their turn at the client (a 429 says so). */
const MAX_RUNNING = 2;
let running = 0;
const PROGRESS_EVERY_MS = 150;

// A full threshold set is a few kilobytes; anything far larger is refused before parsing.
const MAX_BODY_BYTES = 64 * 1024;

/**
 * POST { compressorId, span: "24h" | "7d" | "30d", scopeType, scopeId, limits } — runs the proposed set against the one
 * in force over the compressor's stored history and streams NDJSON: {"type":"progress","fraction":0.42,"phase":"raw"}
 * lines while it reads, then one {"type":"result",...} (or {"type":"error",...}). Closing the request stops the work.
 */
export const POST = route(async (request: Request) => {
  const refusal = crossOriginRefusal(request, "Backtests are run only from Airkeep's own pages.");
  if (refusal) return refusal;
  const user = await requirePermission("thresholds.view");
  const text = await readBodyLimited(request, MAX_BODY_BYTES);
  if (text === null) return errorJson(413, "The request is too large.");
  let raw: unknown;
  try {
    raw = JSON.parse(text || "{}");
  } catch {
    return errorJson(400, "The request body is not JSON.");
  }
  const body = backtestRequestSchema.parse(raw);
  const db = getDb();
  const compressor = getCompressor(db, body.compressorId);
  if (!compressor || !inScope(user, compressor.siteId)) return errorJson(404, "No such compressor.");
  if (running >= MAX_RUNNING) {
    return errorJson(429, "Other backtests are running on the server just now. Try again in a few seconds.", undefined);
  }

  running++;
  const encoder = new TextEncoder();
  let closed = false;
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const send = (m: BacktestMessage) => {
        if (closed) return;
        try {
          controller.enqueue(encoder.encode(`${JSON.stringify(m)}\n`));
        } catch {
          closed = true;
        }
      };
      let lastSent = 0;
      try {
        const result = await runBacktest(db, body, {
          signal: request.signal,
          onProgress: (fraction, phase) => {
            const now = performance.now();
            if (now - lastSent < PROGRESS_EVERY_MS && fraction < 1) return;
            lastSent = now;
            send({ type: "progress", fraction, phase });
          },
        });
        send({ type: "result", result });
      } catch (e) {
        if (e instanceof BacktestRefusal) send({ type: "error", status: e.status, error: e.message });
        else if (!request.signal.aborted) {
          console.error("[backtest] failed", e);
          send({ type: "error", status: 500, error: "The backtest failed on the server. It has been logged." });
        }
      } finally {
        running--;
        if (!closed) {
          closed = true;
          try {
            controller.close();
          } catch {
            // the client went away
          }
        }
      }
    },
    cancel() {
      closed = true;
    },
  });
  return new Response(stream, {
    headers: { "content-type": "application/x-ndjson; charset=utf-8", "cache-control": "no-store", "x-accel-buffering": "no" },
  });
});
