import { NextResponse } from "next/server";
import { readHealth } from "@/lib/health";

export const dynamic = "force-dynamic";

export function GET() {
  const health = readHealth();
  return NextResponse.json(health, { status: health.status === "ok" ? 200 : 503, headers: { "cache-control": "no-store" } });
}
