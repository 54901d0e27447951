import { NextResponse, type NextRequest } from "next/server";
import { getDb } from "@/db/client";
import { listMailbox } from "@/db/mail";
import { route } from "@/lib/api/route";
import { requirePermission } from "@/lib/auth/current-user";
import { mailboxQuerySchema } from "@/shared/notify-mailbox";

export const dynamic = "force-dynamic";

/** What the built-in SMTP fake received, newest first: ?limit=&offset=&q= */
export const GET = route(async (req: NextRequest) => {
  await requirePermission("admin.mail");
  const query = mailboxQuerySchema.parse(Object.fromEntries(req.nextUrl.searchParams));
  return NextResponse.json(listMailbox(getDb(), query), { headers: { "cache-control": "no-store" } });
});
