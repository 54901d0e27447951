import { dehydrate, HydrationBoundary, QueryClient } from "@tanstack/react-query";
import { MailboxAdmin } from "@/components/admin/mailbox-admin";
import { mailQueries } from "@/components/queries/mail";
import { getDb } from "@/db/client";
import { getMailboxMessage, listMailbox, outboxSummary } from "@/db/mail";
import { pageUser } from "@/lib/auth/current-user";
import { mailConfigFromEnv } from "@/lib/mail/config";

export const metadata = { title: "Mailbox · Admin" };
export const dynamic = "force-dynamic";

export default async function AdminMailboxPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await pageUser("admin.mail");
  const db = getDb();
  const raw = (await searchParams).id;
  const id = typeof raw === "string" && /^\d+$/.test(raw) ? Number(raw) : null;
  const client = new QueryClient();
  const first = { limit: 25, offset: 0, q: "" };
  client.setQueryData(mailQueries.mailbox(first).queryKey, listMailbox(db, first));
  client.setQueryData(mailQueries.outbox().queryKey, outboxSummary(db));
  const message = id !== null ? getMailboxMessage(db, id) : null;
  if (message) client.setQueryData(mailQueries.message(message.id).queryKey, message);
  const mail = mailConfigFromEnv();
  let target = mail.smtpUrl;
  try {
    target = new URL(mail.smtpUrl).host; // never show credentials
  } catch {
    // shown as given
  }
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <MailboxAdmin usingFake={mail.useFake} smtpTarget={target} initialId={message ? message.id : null} />
    </HydrationBoundary>
  );
}
