import { NextResponse, type NextRequest } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getMailboxMessage } from "@/db/mail";
import { errorJson, route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";

const params = z.object({ id: z.coerce.number().int().positive() });

/** One received message with its headers, text and HTML parts. */
export const GET = route(async (_req: NextRequest, ctx: { params: Promise<{ id: string }> }) => {
  await requirePermission("admin.mail");
  const { id } = params.parse(await ctx.params);
  const message = getMailboxMessage(getDb(), id);
  if (!message) return errorJson(404, "No such message.");
  return NextResponse.json(message, { headers: { "cache-control": "no-store" } });
});
