import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { CompressorsAdmin } from "@/components/admin/compressors-admin";
import { adminQueries } from "@/components/queries/admin";
import { getDb } from "@/db/client";
import { listCompressors, listModels } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Compressors · Admin" };

export default async function AdminCompressorsPage() {
  await pageUser("admin.compressors");
  const db = getDb();
  const queryClient = new QueryClient();
  queryClient.setQueryData(adminQueries.compressors().queryKey, listCompressors(db, null));
  queryClient.setQueryData(adminQueries.sites().queryKey, listSites(db, null));
  queryClient.setQueryData(adminQueries.models().queryKey, listModels(db));
  return (
    <HydrationBoundary state={dehydrate(queryClient)}>
      <CompressorsAdmin />
    </HydrationBoundary>
  );
}
