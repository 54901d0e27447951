"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { createContact, deleteContact, sendTestMail, updateContact } from "@/lib/actions/admin-contacts";
import { DataTable, type DataColumn } from "@/components/data-table";
import { mailQueries, type ContactsPageData } from "@/components/queries/mail";
import { contactInputSchema, contactUpdateSchema, type ContactDto } from "@/shared/contact-schema";
import { ConfirmDelete, LocalNow } from "./contacts-parts";
import { RotaSection } from "./contacts-rota";
import { RulesSection } from "./contacts-rules";
import { buttonClass, CheckboxField, FormActions, FormAlert, FormPanel, SelectField, StatusLine, TextField, useSchemaForm } from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

type Panel = { kind: "create" } | { kind: "edit"; contact: ContactDto } | null;

export function ContactsAdmin() {
  const overview = useQuery(mailQueries.contacts());
  const data = overview.data;
  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <h1 className="text-xl font-semibold">Contacts and on-call</h1>
        <p className="max-w-3xl text-sm text-muted">
          Who Airkeep e-mails about alarms. Rules choose, by site and priority, who is told first and who is told next when
          nobody acknowledges; the rota says who is on call at each site, in the site&apos;s local time. Every change is audited.
        </p>
      </div>
      {overview.error && <p role="alert">Could not load contacts: {overview.error.message}</p>}
      {data && <OnCallNow data={data} />}
      <ContactsSection data={data} loading={overview.isPending} />
      <RulesSection data={data} loading={overview.isPending} />
      <RotaSection data={data} loading={overview.isPending} />
    </div>
  );
}

function OnCallNow({ data }: { data: ContactsPageData }) {
  return (
    <section aria-labelledby="on-call-now" className="rounded border border-line bg-panel p-3">
      <h2 id="on-call-now" className="text-base font-semibold">
        On call now
      </h2>
      <ul className="mt-1 grid gap-2 md:grid-cols-3" data-testid="on-call-now">
        {data.onCallNow.map((s) => (
          <li key={s.siteId} className="rounded border border-line bg-raised px-2 py-1.5 text-sm">
            <span className="font-semibold">{s.siteName}</span>
            <span className="block text-xs text-muted">
              <LocalNow timeZone={s.timeZone} at={data.at} />
            </span>
            {s.contacts.length ? (
              <span>{s.contacts.map((c) => c.name).join(", ")}</span>
            ) : (
              <span className="font-semibold">Nobody on the rota now: rules naming a contact still apply.</span>
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}

function ContactsSection({ data, loading }: { data: ContactsPageData | undefined; loading: boolean }) {
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);
  const [rowError, setRowError] = useState<string | null>(null);
  const [busyId, setBusyId] = useState<number | null>(null);

  async function test(c: ContactDto) {
    setBusyId(c.id);
    setRowError(null);
    setStatus(null);
    try {
      const r = await sendTestMail({ contactId: c.id });
      if (r.ok) setStatus(`Test e-mail queued for ${r.data.to}. Its delivery shows in Admin → Mailbox.`);
      else setRowError(r.error);
    } catch {
      setRowError("The server could not be reached. Check the connection and try again.");
    } finally {
      setBusyId(null);
    }
  }

  const columns: DataColumn<ContactDto>[] = [
    { id: "name", header: "Name", sortValue: (c) => c.name, cell: (c) => <span className="font-semibold">{c.name}</span> },
    { id: "email", header: "E-mail", sortValue: (c) => c.email, cell: (c) => <span className="num">{c.email}</span> },
    { id: "account", header: "Account", sortValue: (c) => c.userName ?? "", cell: (c) => c.userName ?? <span className="text-muted">—</span> },
    {
      id: "active",
      header: "Receives mail",
      sortValue: (c) => (c.active ? "Yes" : "No"),
      cell: (c) =>
        c.active ? "Yes" : <span className="rounded border border-dashed border-muted px-1 text-xs font-semibold text-muted">Paused</span>,
    },
    { id: "rules", header: "Rules", numeric: true, sortValue: (c) => c.ruleCount, cell: (c) => c.ruleCount },
    { id: "rota", header: "Rota lines", numeric: true, sortValue: (c) => c.rotaCount, cell: (c) => c.rotaCount },
    { id: "note", header: "Note", cell: (c) => <span className="text-xs text-muted">{c.note}</span> },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (c) => (
        <div className="flex flex-wrap justify-end gap-1">
          <button
            type="button"
            className={buttonClass.small}
            aria-label={`Edit contact ${c.name}`}
            onClick={() => {
              setStatus(null);
              setPanel({ kind: "edit", contact: c });
            }}
          >
            Edit
          </button>
          <button type="button" className={buttonClass.small} disabled={busyId === c.id || !c.active} onClick={() => test(c)} aria-label={`Send a test e-mail to ${c.name}`}>
            {busyId === c.id ? "Queueing…" : "Send test"}
          </button>
          <ConfirmDelete
            label={`Delete contact ${c.name}`}
            warning={c.ruleCount + c.rotaCount > 0 ? `Also removes ${c.ruleCount} rule(s) and ${c.rotaCount} rota line(s).` : undefined}
            onConfirm={async () => {
              const r = await deleteContact({ id: c.id });
              if (!r.ok) return r.error;
              setPanel(null);
              setStatus(`Deleted contact ${c.name}.`);
              await refresh();
              return null;
            }}
          />
        </div>
      ),
    },
  ];

  return (
    <section aria-labelledby="contacts-heading" className="space-y-2">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="contacts-heading" className="text-lg font-semibold">
          Contacts
        </h2>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a contact
        </button>
      </div>
      {panel && data && (
        <ContactForm
          key={panel.kind === "edit" ? panel.contact.id : "new"}
          contact={panel.kind === "edit" ? panel.contact : null}
          users={data.users}
          onCancel={() => setPanel(null)}
          onDone={async (c, created) => {
            setPanel(null);
            setStatus(created ? `Added contact ${c.name}.` : `Saved contact ${c.name}.`);
            await refresh();
          }}
        />
      )}
      {rowError && (
        <p role="alert" className="rounded border-2 border-ink bg-raised px-2 py-1.5 text-sm font-semibold">
          {rowError}
        </p>
      )}
      <StatusLine message={status} />
      <DataTable
        data-testid="contacts-table"
        caption="Contacts"
        rows={data?.contacts ?? []}
        columns={columns}
        rowKey={(c) => c.id}
        initialSort={{ columnId: "name", direction: "asc" }}
        loading={loading}
        emptyText="No contacts yet. Add the people who should hear about alarms."
        rowProps={(c) => ({ "data-testid": "contact-row", className: c.active ? undefined : "text-muted" })}
      />
    </section>
  );
}

type ContactValues = { name: string; email: string; userId: string; active: boolean; note: string };

function ContactForm({
  contact,
  users,
  onDone,
  onCancel,
}: {
  contact: ContactDto | null;
  users: ContactsPageData["users"];
  onDone: (c: ContactDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const c = contact;
  const initial: ContactValues = {
    name: c?.name ?? "",
    email: c?.email ?? "",
    userId: c?.userId != null ? String(c.userId) : "",
    active: c?.active ?? true,
    note: c?.note ?? "",
  };
  const form = useSchemaForm({
    schema: c ? contactUpdateSchema : contactInputSchema,
    initial,
    toInput: (v) => (c ? { ...v, id: c.id } : v),
  });
  const title = c ? `Edit contact ${c.name}` : "Add a contact";
  const userOptions = users.map((u) => ({ value: String(u.id), label: `${u.name} (${u.email})` }));
  if (c?.userId != null && !users.some((u) => u.id === c.userId)) userOptions.unshift({ value: String(c.userId), label: c.userName ?? `Account ${c.userId}` });
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-2"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(c ? updateContact : createContact);
          if (saved) onDone(saved, !c);
        }}
      >
        <TextField form={form} name="name" label="Name" maxLength={120} />
        <TextField form={form} name="email" label="E-mail" type="email" maxLength={254} />
        <SelectField
          form={form}
          name="userId"
          label="Airkeep account"
          placeholder="No account"
          options={userOptions}
          hint="Optional. Mails to a contact with an account use that person's units (bar/psi/MPa, °C/°F)."
        />
        <CheckboxField form={form} name="active" label="Receives mail" hint="Clear to pause all mail to this contact (leave, illness)." className="self-center" />
        <TextField form={form} name="note" label="Note" maxLength={300} className="md:col-span-2" hint="For administrators, e.g. the person's role or phone fallback." />
        <div className="space-y-2 md:col-span-2">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={c ? "Save contact" : "Add contact"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
