"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { createSite, updateSite } from "@/lib/actions/admin-sites";
import { DataTable, type DataColumn } from "@/components/data-table";
import { adminQueries } from "@/components/queries/admin";
import { siteInputSchema, siteUpdateSchema, type SiteDto } from "@/shared/site-schema";
import { buttonClass, FormActions, FormAlert, FormPanel, SelectField, StatusLine, TextField, useSchemaForm } from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

type Panel = { kind: "create" } | { kind: "edit"; site: SiteDto } | null;

export function SitesAdmin({ timeZones }: { timeZones: string[] }) {
  const sites = useQuery(adminQueries.sites());
  const compressors = useQuery(adminQueries.compressors());
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);

  const counts = new Map<number, number>();
  for (const c of compressors.data ?? []) counts.set(c.siteId, (counts.get(c.siteId) ?? 0) + 1);

  const columns: DataColumn<SiteDto>[] = [
    { id: "name", header: "Name", sortValue: (s) => s.name, cell: (s) => s.name },
    { id: "code", header: "Code", sortValue: (s) => s.code, cell: (s) => <span className="num">{s.code}</span> },
    { id: "timeZone", header: "Time zone", sortValue: (s) => s.timeZone, cell: (s) => s.timeZone },
    { id: "address", header: "Address", sortValue: (s) => s.address, cell: (s) => s.address || <span className="text-muted">—</span> },
    {
      id: "compressors",
      header: "Compressors",
      numeric: true,
      sortValue: (s) => counts.get(s.id) ?? 0,
      cell: (s) => counts.get(s.id) ?? 0,
    },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (s) => (
        <div className="flex justify-end">
          <button
            type="button"
            className={buttonClass.small}
            aria-label={`Edit site ${s.name}`}
            onClick={() => {
              setStatus(null);
              setPanel({ kind: "edit", site: s });
            }}
          >
            Edit
          </button>
        </div>
      ),
    },
  ];

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <h1 className="text-xl font-semibold">Sites</h1>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a site
        </button>
      </div>
      {panel && (
        <SiteForm
          key={panel.kind === "edit" ? panel.site.id : "new"}
          site={panel.kind === "edit" ? panel.site : null}
          compressorCount={panel.kind === "edit" ? (counts.get(panel.site.id) ?? 0) : 0}
          timeZones={timeZones}
          onCancel={() => setPanel(null)}
          onDone={async (s, created) => {
            setPanel(null);
            setStatus(created ? `Added site ${s.name}.` : `Saved site ${s.name}.`);
            await refresh();
          }}
        />
      )}
      <StatusLine message={status} />
      {sites.error && <p role="alert">Could not load sites: {sites.error.message}</p>}
      <DataTable
        data-testid="sites-table"
        caption="Sites"
        rows={sites.data ?? []}
        columns={columns}
        rowKey={(s) => s.id}
        initialSort={{ columnId: "name", direction: "asc" }}
        loading={sites.isPending}
        emptyText="No sites yet. Add the first one."
        rowProps={() => ({ "data-testid": "site-row" })}
      />
    </div>
  );
}

function localTimeIn(timeZone: string): string | null {
  try {
    return new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", weekday: "short", timeZoneName: "short" }).format(
      new Date(),
    );
  } catch {
    return null;
  }
}

function SiteForm({
  site,
  compressorCount,
  timeZones,
  onDone,
  onCancel,
}: {
  site: SiteDto | null;
  compressorCount: number;
  timeZones: string[];
  onDone: (s: SiteDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const form = useSchemaForm({
    schema: site ? siteUpdateSchema : siteInputSchema,
    initial: {
      name: site?.name ?? "",
      code: site?.code ?? "",
      timeZone: site?.timeZone ?? "",
      address: site?.address ?? "",
    },
    toInput: (v) => (site ? { ...v, id: site.id } : v),
  });
  const zones = site && !timeZones.includes(site.timeZone) ? [site.timeZone, ...timeZones] : timeZones;
  const now = form.values.timeZone ? localTimeIn(form.values.timeZone) : null;
  const codeChanged = site != null && form.values.code.trim() !== site.code;
  const title = site ? `Edit site ${site.name}` : "Add a site";
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-2"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(site ? updateSite : createSite);
          if (saved) onDone(saved, !site);
        }}
      >
        <TextField form={form} name="name" label="Name" maxLength={120} />
        <TextField
          form={form}
          name="code"
          label="Code"
          maxLength={63}
          hint={
            codeChanged && compressorCount > 0
              ? `Changing the code changes the MQTT topics of this site's ${compressorCount} compressor(s); their gateways must be reconfigured.`
              : "Lower-case letters, digits and hyphens; part of every MQTT topic of the site."
          }
        />
        <SelectField
          form={form}
          name="timeZone"
          label="Time zone"
          placeholder="Choose a time zone…"
          options={zones.map((z) => ({ value: z, label: z }))}
          hint={now ? `Local time there now: ${now}` : "Times on reports and the event log use this zone."}
        />
        <TextField form={form} name="address" label="Address" maxLength={300} />
        <div className="space-y-2 md:col-span-2">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={site ? "Save site" : "Add site"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
