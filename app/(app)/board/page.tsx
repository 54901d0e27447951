import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { FleetList } from "@/components/fleet-list";
import { fleetQueries } from "@/components/queries/fleet";
import { makeQueryClient } from "@/components/query-client";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Board" };

export default async function BoardPage() {
  const user = await pageUser("board.view");
  const db = getDb();
  const client = makeQueryClient();
  await client.prefetchQuery({ ...fleetQueries.sites(), queryFn: () => listSites(db, user.siteIds) });
  await client.prefetchQuery({ ...fleetQueries.compressors(), queryFn: () => listCompressors(db, user.siteIds) });
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <h1 className="mb-3 text-2xl font-semibold">Board</h1>
      <FleetList />
    </HydrationBoundary>
  );
}
