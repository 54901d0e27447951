import { z } from "zod";
import { getDb } from "@/db/client";
import { listSites } from "@/db/sites";
import { requirePermission, type CurrentUser } from "@/lib/auth/current-user";
import { parseScope, reportQuerySchema, type ReportScope } from "@/shared/availability";
import { monthHasBegun, previousMonth, type Month } from "@/shared/month";

export type ReportRequestParams = { user: CurrentUser; month: Month; scope: ReportScope; scopeParam: string };

/** The month a person sees when none is asked for: the last whole month in the zone of their first site. */
export function defaultMonth(user: Pick<CurrentUser, "siteIds">, now = Date.now()): Month {
  const first = listSites(getDb(), user.siteIds)[0];
  return previousMonth(now, first?.timeZone ?? "UTC");
}

/** Authorises (reports.view) and reads ?month=&scope= ; a bad value throws a ZodError (400). */
export async function readReportRequest(request: Request): Promise<ReportRequestParams> {
  const user = await requirePermission("reports.view");
  const sp = new URL(request.url).searchParams;
  const q = reportQuerySchema.parse({ month: sp.get("month") ?? defaultMonth(user), scope: sp.get("scope") ?? undefined });
  if (!monthHasBegun(q.month, Date.now())) {
    throw new z.ZodError([{ code: "custom", path: ["month"], message: "That month has not begun yet", input: q.month }]);
  }
  return { user, month: q.month, scope: parseScope(q.scope), scopeParam: q.scope };
}

export const noStore = { "cache-control": "no-store" } as const;
