import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { SitesAdmin } from "@/components/admin/sites-admin";
import { adminQueries } from "@/components/queries/admin";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";
import { isValidTimeZone } from "@/shared/site-schema";

export const metadata = { title: "Sites · Admin" };

/** IANA zones this server knows, with UTC first (Intl lists only zones with a region). */
function timeZones(): string[] {
  return ["UTC", ...Intl.supportedValuesOf("timeZone").filter((z) => z !== "UTC" && isValidTimeZone(z))];
}

export default async function AdminSitesPage() {
  await pageUser("admin.sites");
  const db = getDb();
  const queryClient = new QueryClient();
  queryClient.setQueryData(adminQueries.sites().queryKey, listSites(db, null));
  queryClient.setQueryData(adminQueries.compressors().queryKey, listCompressors(db, null));
  return (
    <HydrationBoundary state={dehydrate(queryClient)}>
      <SitesAdmin timeZones={timeZones()} />
    </HydrationBoundary>
  );
}
