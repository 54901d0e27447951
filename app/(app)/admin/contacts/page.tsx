import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { ContactsAdmin } from "@/components/admin/contacts-admin";
import { mailQueries } from "@/components/queries/mail";
import { getDb } from "@/db/client";
import { contactsOverview } from "@/db/contacts";
import { pageUser } from "@/lib/auth/current-user";
import { escalateAfterMinFromEnv } from "@/lib/notify/config";

export const metadata = { title: "Contacts and on-call · Admin" };
export const dynamic = "force-dynamic";

export default async function AdminContactsPage() {
  await pageUser("admin.mail");
  const client = new QueryClient();
  client.setQueryData(mailQueries.contacts().queryKey, contactsOverview(getDb(), { defaultEscalateAfterMin: escalateAfterMinFromEnv() }));
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <ContactsAdmin />
    </HydrationBoundary>
  );
}
