import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { ModelsAdmin } from "@/components/admin/models-admin";
import { adminQueries } from "@/components/queries/admin";
import { getDb } from "@/db/client";
import { listCompressors, listModels } from "@/db/compressors";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Compressor models · Admin" };

export default async function AdminModelsPage() {
  await pageUser("admin.compressors");
  const db = getDb();
  const queryClient = new QueryClient();
  queryClient.setQueryData(adminQueries.models().queryKey, listModels(db));
  queryClient.setQueryData(adminQueries.compressors().queryKey, listCompressors(db, null));
  return (
    <HydrationBoundary state={dehydrate(queryClient)}>
      <ModelsAdmin />
    </HydrationBoundary>
  );
}
