import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadBoard } from "@/db/board";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { noStore } from "../hub-address";

export const dynamic = "force-dynamic";

/** Every site and compressor in the person's scope with its last stored state (the board's fallback and refresh). */
export const GET = route(async () => {
  const user = await requirePermission("board.view");
  return NextResponse.json(loadBoard(getDb(), user.siteIds), { headers: noStore });
});
