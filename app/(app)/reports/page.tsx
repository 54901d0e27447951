import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { reportQueries } from "@/components/queries/reports";
import { makeQueryClient } from "@/components/query-client";
import { ReportView } from "@/components/reports/report-view";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { buildMonthlyReport } from "@/db/reports";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";
import { parseScope, reportQuerySchema } from "@/shared/availability";
import { monthHasBegun, monthLabel, monthOf, previousMonth } from "@/shared/month";

export const dynamic = "force-dynamic";

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

export async function generateMetadata({ searchParams }: Props): Promise<Metadata> {
  const user = await pageUser("reports.view");
  const zone = listSites(getDb(), user.siteIds)[0]?.timeZone ?? "UTC";
  const month = reportQuerySchema.shape.month.safeParse(first((await searchParams).month) ?? previousMonth(Date.now(), zone));
  return { title: month.success ? `Report · ${monthLabel(month.data)}` : "Reports" };
}

export default async function ReportsPage({ searchParams }: Props) {
  const user = await pageUser("reports.view");
  const db = getDb();
  const now = Date.now();
  const sites = listSites(db, user.siteIds);
  const zone = sites[0]?.timeZone ?? "UTC";
  const sp = await searchParams;
  const parsed = reportQuerySchema.safeParse({ month: first(sp.month) ?? previousMonth(now, zone), scope: first(sp.scope) ?? undefined });
  if (!parsed.success || !monthHasBegun(parsed.data.month, now)) {
    return (
      <p role="alert" className="rounded border border-line bg-raised p-3">
        That month or scope is not one a report can be made for. Choose a month up to the current one, and a site or compressor you can see.{" "}
        <a href="/reports">Last month&apos;s fleet report</a>
      </p>
    );
  }
  const { month, scope } = parsed.data;
  const req = { month, scope: parseScope(scope), siteIds: user.siteIds, now };
  const report = buildMonthlyReport(db, req);
  if (!report) notFound();
  const client = makeQueryClient();
  // The 12-month comparison reads a year of rollups: it loads after the page, from its own route.
  await client.prefetchQuery({ ...reportQueries.report(month, scope), queryFn: () => report });
  const options = {
    sites: sites.map((s) => ({ id: s.id, name: s.name })),
    compressors: listCompressors(db, user.siteIds).map((c) => ({ id: c.id, name: c.name, siteId: c.siteId })),
  };
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <ReportView month={month} scope={scope} options={options} latestMonth={monthOf(now, zone)} />
    </HydrationBoundary>
  );
}
