"use client";

import { useState } from "react";
import { createRotaEntry, deleteRotaEntry, updateRotaEntry } from "@/lib/actions/admin-contacts";
import { DataTable, type DataColumn } from "@/components/data-table";
import type { ContactsPageData } from "@/components/queries/mail";
import { rotaEntryInputSchema, rotaEntryUpdateSchema, type RotaEntryDto } from "@/shared/contact-schema";
import { describeShift, weekdayNames } from "@/shared/notify-rota";
import { ConfirmDelete } from "./contacts-parts";
import { buttonClass, CheckboxGroupField, FormActions, FormAlert, FormPanel, SelectField, StatusLine, TextField, useSchemaForm } from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

type Panel = { kind: "create" } | { kind: "edit"; entry: RotaEntryDto } | null;

export function RotaSection({ data, loading }: { data: ContactsPageData | undefined; loading: boolean }) {
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);

  const columns: DataColumn<RotaEntryDto>[] = [
    { id: "site", header: "Site", sortValue: (e) => `${e.siteName}\u0000${String(e.position).padStart(3, "0")}`, cell: (e) => e.siteName },
    { id: "position", header: "Order", numeric: true, sortValue: (e) => e.position, cell: (e) => e.position },
    {
      id: "contact",
      header: "Contact",
      sortValue: (e) => e.contactName,
      cell: (e) => (e.contactActive ? e.contactName : <span className="text-muted">{e.contactName} (paused)</span>),
    },
    { id: "shift", header: "Shift (site time)", cell: (e) => <span className="num">{describeShift(e)}</span> },
    { id: "zone", header: "Time zone", sortValue: (e) => e.timeZone, cell: (e) => <span className="text-xs text-muted">{e.timeZone}</span> },
    {
      id: "now",
      header: "Now",
      sortValue: (e) => (e.onCallNow ? 0 : 1),
      cell: (e) => (e.onCallNow ? <span className="rounded border border-ink px-1 text-xs font-semibold">On call</span> : null),
    },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (e) => (
        <div className="flex flex-wrap justify-end gap-1">
          <button
            type="button"
            className={buttonClass.small}
            aria-label={`Edit rota line of ${e.contactName} at ${e.siteName}`}
            onClick={() => {
              setStatus(null);
              setPanel({ kind: "edit", entry: e });
            }}
          >
            Edit
          </button>
          <ConfirmDelete
            label={`Delete rota line of ${e.contactName} at ${e.siteName}`}
            onConfirm={async () => {
              const r = await deleteRotaEntry({ id: e.id });
              if (!r.ok) return r.error;
              setPanel(null);
              setStatus(`Removed ${e.contactName} (${describeShift(e)}) from the ${e.siteName} rota.`);
              await refresh();
              return null;
            }}
          />
        </div>
      ),
    },
  ];

  return (
    <section aria-labelledby="rota-heading" className="space-y-2">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="rota-heading" className="text-lg font-semibold">
          On-call rota
        </h2>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          disabled={!data || data.contacts.length === 0 || data.sites.length === 0}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a rota line
        </button>
      </div>
      <p className="max-w-3xl text-sm text-muted">
        Each line puts a contact on call at one site on the chosen weekdays between two local times at that site; an end at or
        before the start runs into the next day. When several people are on call at once, the lower order is told first. On
        the days the clocks change, a time that does not exist counts from just after the change and a time that happens
        twice counts from its first occurrence.
      </p>
      {panel && data && (
        <RotaForm
          key={panel.kind === "edit" ? panel.entry.id : "new"}
          entry={panel.kind === "edit" ? panel.entry : null}
          data={data}
          onCancel={() => setPanel(null)}
          onDone={async (e, created) => {
            setPanel(null);
            setStatus(`${created ? "Added" : "Saved"} ${e.contactName}, ${describeShift(e)} at ${e.siteName}.`);
            await refresh();
          }}
        />
      )}
      <StatusLine message={status} />
      <DataTable
        data-testid="rota-table"
        caption="On-call rota"
        rows={data?.rota ?? []}
        columns={columns}
        rowKey={(e) => e.id}
        initialSort={{ columnId: "site", direction: "asc" }}
        loading={loading}
        pageSize={50}
        emptyText="No rota yet: on-call rules reach nobody until people are on the rota."
        rowProps={(e) => ({ "data-testid": "rota-row", className: e.onCallNow ? "font-semibold" : undefined })}
      />
    </section>
  );
}

type RotaValues = { siteId: string; contactId: string; position: string; weekdays: number[]; startTime: string; endTime: string };

const dayOptions = weekdayNames.map((label, i) => ({ value: i + 1, label }));

function RotaForm({
  entry,
  data,
  onDone,
  onCancel,
}: {
  entry: RotaEntryDto | null;
  data: ContactsPageData;
  onDone: (e: RotaEntryDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const e = entry;
  const initial: RotaValues = {
    siteId: e ? String(e.siteId) : "",
    contactId: e ? String(e.contactId) : "",
    position: String(e?.position ?? 0),
    weekdays: e?.weekdays ?? [1, 2, 3, 4, 5],
    startTime: e?.startTime ?? "07:00",
    endTime: e?.endTime ?? "19:00",
  };
  const form = useSchemaForm({
    schema: e ? rotaEntryUpdateSchema : rotaEntryInputSchema,
    initial,
    toInput: (v) => (e ? { ...v, id: e.id } : v),
  });
  const site = data.sites.find((s) => String(s.id) === form.values.siteId);
  const title = e ? `Edit rota line of ${e.contactName}` : "Add a rota line";
  const preview = form.values.weekdays.length ? describeShift(form.values) : null;
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-3"
        onSubmit={async (ev) => {
          ev.preventDefault();
          const saved = await form.submit(e ? updateRotaEntry : createRotaEntry);
          if (saved) onDone(saved, !e);
        }}
      >
        <SelectField
          form={form}
          name="siteId"
          label="Site"
          placeholder="Choose a site…"
          options={data.sites.map((s) => ({ value: String(s.id), label: `${s.name} (${s.timeZone})` }))}
        />
        <SelectField
          form={form}
          name="contactId"
          label="Contact"
          placeholder="Choose a contact…"
          options={data.contacts.map((c) => ({ value: String(c.id), label: c.active ? c.name : `${c.name} (paused)` }))}
        />
        <TextField form={form} name="position" label="Order" numeric maxLength={3} hint="Among people on call at the same time: lower is told first." />
        <CheckboxGroupField form={form} name="weekdays" label="Starts on" options={dayOptions} className="md:col-span-3" />
        <TextField
          form={form}
          name="startTime"
          label="From"
          placeholder="07:00"
          maxLength={5}
          hint={site ? `Local time in ${site.timeZone}.` : "Local time at the site."}
        />
        <TextField form={form} name="endTime" label="Until" placeholder="19:00" maxLength={5} hint="At or before the start: ends the next day." />
        <p className="self-center text-sm" aria-live="polite">
          {preview}
        </p>
        <div className="space-y-2 md:col-span-3">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={e ? "Save rota line" : "Add rota line"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
