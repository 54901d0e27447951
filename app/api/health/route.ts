import { NextResponse } from "next/server";
import { readHealth } from "@/lib/health";

export const dynamic = "force-dynamic";

/** No session needed: 200 while the database answers (status says whether ingestion is live), 503 when it does not. */
export function GET() {
  const health = readHealth();
  return NextResponse.json(health, { status: health.database.ok ? 200 : 503, headers: { "cache-control": "no-store" } });
}
