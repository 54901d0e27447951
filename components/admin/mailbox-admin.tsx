"use client";

import { useQuery } from "@tanstack/react-query";
import { useEffect, useId, useRef, useState } from "react";
import { DataTable, type DataColumn } from "@/components/data-table";
import { mailQueries } from "@/components/queries/mail";
import type { MailboxItemDto, OutboxItemDto, OutboxStatus } from "@/shared/notify-mailbox";
import { priorityWord } from "@/shared/notify-text";
import { buttonClass } from "./form-kit";

/** "2025-03-14 14:05:09 UTC": the same on the server and in every browser. */
function utc(ms: number | null): string {
  if (ms == null) return "—";
  return `${new Date(ms).toISOString().slice(0, 19).replace("T", " ")} UTC`;
}

function kb(bytes: number): string {
  return bytes < 1024 ? `${bytes} B` : `${(bytes / 1024).toFixed(1)} kB`;
}

const statusWord: Record<OutboxStatus, string> = { pending: "Waiting", sending: "Sending", sent: "Sent", failed: "Given up" };

export function MailboxAdmin({ usingFake, smtpTarget, initialId }: { usingFake: boolean; smtpTarget: string; initialId: number | null }) {
  const [selected, setSelected] = useState<number | null>(initialId);
  function select(id: number | null) {
    setSelected(id);
    const url = new URL(window.location.href);
    if (id === null) url.searchParams.delete("id");
    else url.searchParams.set("id", String(id));
    window.history.replaceState(null, "", url);
  }
  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <h1 className="text-xl font-semibold">Mailbox</h1>
        <p className="max-w-3xl text-sm text-muted">
          {usingFake
            ? "Alarm e-mail goes to Airkeep's built-in SMTP fake, which keeps every message here instead of delivering it. Set SMTP_URL to send through a real mail server."
            : `Alarm e-mail goes to ${smtpTarget}. The received list below only fills when the built-in SMTP fake is in use.`}
        </p>
      </div>
      <OutboxSection />
      <ReceivedSection selected={selected} onSelect={select} />
      {selected !== null && <MessageView id={selected} onClose={() => select(null)} />}
    </div>
  );
}

function OutboxSection() {
  const outbox = useQuery(mailQueries.outbox());
  const counts = outbox.data?.counts;
  const columns: DataColumn<OutboxItemDto>[] = [
    {
      id: "status",
      header: "Status",
      sortValue: (r) => r.status,
      cell: (r) =>
        r.status === "failed" ? (
          <span className="rounded border-2 border-ink px-1 text-xs font-semibold">{statusWord[r.status]}</span>
        ) : r.status === "sent" ? (
          <span className="text-xs">{statusWord[r.status]}</span>
        ) : (
          <span className="rounded border border-dashed border-muted px-1 text-xs font-semibold">{statusWord[r.status]}</span>
        ),
    },
    { id: "created", header: "Queued", sortValue: (r) => r.createdAt, cell: (r) => <span className="num text-xs">{utc(r.createdAt)}</span> },
    { id: "to", header: "To", sortValue: (r) => r.toAddress, cell: (r) => <span title={r.toName}>{r.toAddress}</span> },
    {
      id: "subject",
      header: "Subject",
      sortValue: (r) => r.subject,
      cell: (r) => (
        <span>
          {r.subject}
          <span className="block text-xs text-muted">
            {r.kind}
            {r.priority ? ` · ${priorityWord[r.priority]}` : ""} · <span className="num">{r.key}</span>
          </span>
        </span>
      ),
    },
    { id: "attempts", header: "Tries", numeric: true, sortValue: (r) => r.attempts, cell: (r) => r.attempts },
    {
      id: "when",
      header: "Sent / next try",
      sortValue: (r) => r.sentAt ?? r.nextAttemptAt,
      cell: (r) => <span className="num text-xs">{r.status === "sent" ? utc(r.sentAt) : r.status === "failed" ? "—" : utc(r.nextAttemptAt)}</span>,
    },
    {
      id: "server",
      header: "Server id / last error",
      cell: (r) =>
        r.status === "sent" ? (
          <span className="num text-xs">{r.serverMessageId ?? "—"}</span>
        ) : (
          <span className="text-xs">{r.lastError ?? ""}</span>
        ),
    },
  ];
  return (
    <section aria-labelledby="outbox-heading" className="space-y-2">
      <div className="flex flex-wrap items-baseline gap-3">
        <h2 id="outbox-heading" className="text-lg font-semibold">
          Outgoing
        </h2>
        {counts && (
          <p className="num text-sm text-muted" data-testid="outbox-counts">
            {counts.pending} waiting · {counts.sending} sending · {counts.sent} sent · {counts.failed} given up
          </p>
        )}
      </div>
      <p className="max-w-3xl text-sm text-muted">
        Each message is queued once (by its key) and sent once. While the mail server cannot be reached, messages wait and
        are retried with growing pauses; nothing is dropped. A message the server refuses outright is given up after a few
        tries.
      </p>
      {outbox.error && <p role="alert">Could not load the outgoing queue: {outbox.error.message}</p>}
      <DataTable
        data-testid="outbox-table"
        caption="Outgoing e-mail"
        rows={outbox.data?.items ?? []}
        columns={columns}
        rowKey={(r) => r.id}
        loading={outbox.isPending}
        pageSize={10}
        emptyText="Nothing has been queued yet."
        rowProps={() => ({ "data-testid": "outbox-row" })}
      />
    </section>
  );
}

function ReceivedSection({ selected, onSelect }: { selected: number | null; onSelect: (id: number) => void }) {
  const [page, setPage] = useState(0);
  const [pageSize, setPageSize] = useState(25);
  const [q, setQ] = useState("");
  const [query, setQuery] = useState("");
  const mailbox = useQuery(mailQueries.mailbox({ limit: pageSize, offset: page * pageSize, q: query }));
  const searchId = useId();
  const columns: DataColumn<MailboxItemDto>[] = [
    { id: "received", header: "Received", cell: (m) => <span className="num text-xs">{utc(m.receivedAt)}</span> },
    { id: "to", header: "To", cell: (m) => m.to },
    {
      id: "subject",
      header: "Subject",
      cell: (m) => (
        <button
          type="button"
          className="text-left underline-offset-2 hover:underline"
          aria-current={selected === m.id ? "true" : undefined}
          onClick={() => onSelect(m.id)}
        >
          {m.subject || "(no subject)"}
        </button>
      ),
    },
    {
      id: "dup",
      header: "Delivery",
      cell: (m) =>
        m.duplicateOf !== null ? (
          <span className="rounded border-2 border-ink px-1 text-xs font-semibold">Duplicate of #{m.duplicateOf}</span>
        ) : (
          <span className="text-xs text-muted">#{m.id}</span>
        ),
    },
    { id: "size", header: "Size", numeric: true, cell: (m) => kb(m.size) },
  ];
  return (
    <section aria-labelledby="received-heading" className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id="received-heading" className="text-lg font-semibold">
          Received by the SMTP fake
        </h2>
        <form
          role="search"
          className="ml-auto flex items-end gap-1"
          onSubmit={(e) => {
            e.preventDefault();
            setPage(0);
            setQuery(q.trim());
          }}
        >
          <label htmlFor={searchId} className="text-xs font-semibold text-muted">
            Search subject, recipient, text
            <input
              id={searchId}
              type="search"
              value={q}
              maxLength={200}
              onChange={(e) => setQ(e.target.value)}
              className="mt-0.5 block w-64 rounded border border-line bg-white px-2 py-1 text-sm text-ink"
            />
          </label>
          <button type="submit" className={buttonClass.secondary}>
            Search
          </button>
        </form>
      </div>
      {mailbox.error && <p role="alert">Could not load the mailbox: {mailbox.error.message}</p>}
      <DataTable
        data-testid="mailbox-table"
        caption="Received messages"
        rows={mailbox.data?.items ?? []}
        columns={columns}
        rowKey={(m) => m.id}
        loading={mailbox.isPending}
        manual={{ totalRows: mailbox.data?.total ?? 0 }}
        page={page}
        onPageChange={setPage}
        pageSize={pageSize}
        onPageSizeChange={(n) => {
          setPageSize(n);
          setPage(0);
        }}
        emptyText={query ? "No message matches." : "No messages received yet."}
        rowProps={(m) => ({ "data-testid": "mailbox-row", className: selected === m.id ? "bg-panel" : undefined })}
      />
    </section>
  );
}

function MessageView({ id, onClose }: { id: number; onClose: () => void }) {
  const message = useQuery(mailQueries.message(id));
  const [tab, setTab] = useState<"text" | "html" | "headers">("text");
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), [id]);
  const m = message.data;
  return (
    <section aria-labelledby="message-heading" className="space-y-2 rounded border border-line bg-raised p-3" data-testid="mailbox-message">
      <div className="flex flex-wrap items-start gap-2">
        <h2 id="message-heading" ref={headingRef} tabIndex={-1} className="text-base font-semibold outline-none">
          {m ? m.subject || "(no subject)" : `Message #${id}`}
        </h2>
        <button type="button" className={`${buttonClass.small} ml-auto`} onClick={onClose}>
          Close
        </button>
      </div>
      {message.error && <p role="alert">Could not load the message: {message.error.message}</p>}
      {m && (
        <>
          <dl className="grid grid-cols-[max-content_1fr] gap-x-3 gap-y-0.5 text-sm">
            <dt className="text-muted">From</dt>
            <dd>{m.from}</dd>
            <dt className="text-muted">To</dt>
            <dd>{m.to}</dd>
            <dt className="text-muted">Envelope</dt>
            <dd className="num text-xs">
              {m.envelopeFrom} → {m.envelopeTo.join(", ")}
            </dd>
            <dt className="text-muted">Received</dt>
            <dd className="num">{utc(m.receivedAt)}</dd>
            <dt className="text-muted">Message-ID</dt>
            <dd className="num text-xs break-all">
              {m.messageId ?? "—"}
              {m.duplicateOf !== null && <strong className="ml-2 font-sans">Duplicate of #{m.duplicateOf}</strong>}
            </dd>
          </dl>
          <div role="tablist" aria-label="Message parts" className="flex gap-1 border-b border-line">
            {(["text", "html", "headers"] as const).map((t) => (
              <button
                key={t}
                type="button"
                role="tab"
                aria-selected={tab === t}
                disabled={t === "html" && !m.html}
                onClick={() => setTab(t)}
                className={`rounded-t px-2 py-1 text-sm disabled:opacity-50 ${tab === t ? "bg-ink text-raised" : "text-ink hover:bg-panel"}`}
              >
                {t === "text" ? "Text" : t === "html" ? "HTML" : "Headers"}
              </button>
            ))}
          </div>
          <div role="tabpanel">
            {tab === "text" && <pre className="max-h-[32rem] overflow-auto text-sm whitespace-pre-wrap">{m.text}</pre>}
            {tab === "html" && m.html && (
              // Sandboxed: no scripts, no same-origin access; links cannot navigate this page.
              <iframe title="HTML part of the message" sandbox="" srcDoc={m.html} className="h-[32rem] w-full rounded border border-line bg-white" />
            )}
            {tab === "headers" && (
              <table className="text-xs">
                <tbody>
                  {m.headers.map(([k, v], i) => (
                    <tr key={i} className="align-top">
                      <th scope="row" className="pr-2 text-left font-semibold whitespace-nowrap">
                        {k}
                      </th>
                      <td className="num break-all">{v}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </div>
        </>
      )}
    </section>
  );
}
