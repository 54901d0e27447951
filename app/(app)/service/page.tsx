import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { z } from "zod";
import { makeQueryClient } from "@/components/query-client";
import { serviceQueries, type ServiceFilter } from "@/components/queries/service";
import { ServiceView } from "@/components/service/service-view";
import { getDb } from "@/db/client";
import { pageUser } from "@/lib/auth/current-user";
import { serviceOverview } from "@/lib/service/overview";
import { can } from "@/shared/roles";

export const dynamic = "force-dynamic";
export const metadata = { title: "Service" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };
const idParam = z.coerce.number().int().positive().optional().catch(undefined);
const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

/** /service — fleet service status (overdue first), the service log with attachments, planned service windows. */
export default async function ServicePage({ searchParams }: Props) {
  const user = await pageUser("service.view");
  const sp = await searchParams;
  const filter: ServiceFilter = { site: idParam.parse(first(sp.site)), compressor: idParam.parse(first(sp.compressor)) };
  const client = makeQueryClient();
  await client.prefetchQuery({ ...serviceQueries.overview(filter), queryFn: () => serviceOverview(getDb(), user.siteIds, filter) });
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <ServiceView
        initialFilter={filter}
        canLog={can(user.role, "service.log")}
        canReset={can(user.role, "service.reset")}
        canCorrect={can(user.role, "service.correct")}
        canPlan={can(user.role, "service.plan")}
      />
    </HydrationBoundary>
  );
}
