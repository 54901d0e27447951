import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { UsersAdmin } from "@/components/admin/users-admin";
import { adminQueries } from "@/components/queries/admin";
import { getDb } from "@/db/client";
import { listSites } from "@/db/sites";
import { listUsers } from "@/db/users";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Users · Admin" };

export default async function AdminUsersPage() {
  const user = await pageUser("admin.users");
  const db = getDb();
  const queryClient = new QueryClient();
  queryClient.setQueryData(adminQueries.users().queryKey, listUsers(db));
  queryClient.setQueryData(adminQueries.sites().queryKey, listSites(db, null));
  return (
    <HydrationBoundary state={dehydrate(queryClient)}>
      <UsersAdmin currentUserId={user.id} />
    </HydrationBoundary>
  );
}
