import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listUsers } from "@/db/users";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  await requirePermission("admin.users");
  return NextResponse.json({ users: listUsers(getDb()) }, { headers: { "cache-control": "no-store" } });
});
