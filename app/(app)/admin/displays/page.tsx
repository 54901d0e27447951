import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { displayLinkQueries } from "@/components/queries/live";
import { getDb } from "@/db/client";
import { listDisplayLinks } from "@/db/display-links";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";
import { DisplayLinksAdmin } from "@/components/admin/display-links-admin";

export const metadata = { title: "Display links · Admin" };
export const dynamic = "force-dynamic";

export default async function AdminDisplaysPage() {
  const user = await pageUser("admin.displays");
  const db = getDb();
  const client = new QueryClient();
  client.setQueryData(displayLinkQueries.list().queryKey, listDisplayLinks(db));
  const sites = listSites(db, user.siteIds).map((s) => ({ value: s.id, label: s.name }));
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <DisplayLinksAdmin sites={sites} limitedToSites={user.siteIds !== null} />
    </HydrationBoundary>
  );
}
