import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import type { ContactsOverview } from "@/shared/contact-schema";
import type { MailboxMessageDto, MailboxPage, OutboxSummary } from "@/shared/notify-mailbox";
import { adminKey } from "./admin";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new Error(body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

export type ContactsPageData = ContactsOverview & {
  sites: { id: number; name: string; timeZone: string }[];
  users: { id: number; name: string; email: string }[];
};

export type MailboxParams = { limit: number; offset: number; q: string };

/** Under the admin key, so an administrative change refreshes these too. */
export const mailQueries = {
  contacts: () =>
    queryOptions({
      queryKey: [...adminKey, "mail", "contacts"],
      queryFn: () => getJson<ContactsPageData>("/api/admin/mail/contacts"),
      refetchInterval: 60_000, // who is on call changes with the clock
    }),
  mailbox: (p: MailboxParams) =>
    queryOptions({
      queryKey: [...adminKey, "mail", "mailbox", p],
      queryFn: () => getJson<MailboxPage>(`/api/admin/mailbox?${new URLSearchParams({ limit: String(p.limit), offset: String(p.offset), q: p.q })}`),
      placeholderData: keepPreviousData,
      refetchInterval: 5_000,
    }),
  message: (id: number) =>
    queryOptions({
      queryKey: [...adminKey, "mail", "message", id],
      queryFn: () => getJson<MailboxMessageDto>(`/api/admin/mailbox/${id}`),
      staleTime: Infinity, // a received message never changes
    }),
  outbox: () =>
    queryOptions({
      queryKey: [...adminKey, "mail", "outbox"],
      queryFn: () => getJson<OutboxSummary>("/api/admin/mail/outbox"),
      refetchInterval: 5_000,
    }),
};
