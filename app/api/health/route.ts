import { NextResponse } from "next/server";
import { currentUser } from "@/lib/auth/current-user";
import { publicHealth, readHealth } from "@/lib/health";
import { can } from "@/shared/roles";

export const dynamic = "force-dynamic";

/**
 * 200 while the database answers, 503 when it does not. Anyone gets the bare status; administrators get the details
 * (version, process counters, broker and ingester state).
 */
export async function GET() {
  const health = readHealth();
  const user = await currentUser().catch(() => null);
  const body = user && can(user.role, "admin.view") ? health : publicHealth(health);
  return NextResponse.json(body, { status: health.database.ok ? 200 : 503, headers: { "cache-control": "no-store" } });
}
