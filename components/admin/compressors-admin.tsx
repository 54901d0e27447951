"use client";

import { useQuery } from "@tanstack/react-query";
import { useEffect, useId, useRef, useState } from "react";
import { createCompressor, issueDeviceCredential, updateCompressor } from "@/lib/actions/admin-compressors";
import type { DeviceCredential } from "@/lib/broker/device-credential";
import { DataTable, type DataColumn } from "@/components/data-table";
import { adminQueries } from "@/components/queries/admin";
import {
  compressorInputSchema,
  compressorUpdateSchema,
  stopPressureProblem,
  type CompressorDto,
  type CompressorModelDto,
} from "@/shared/compressor-schema";
import type { SiteDto } from "@/shared/site-schema";
import {
  buttonClass,
  CheckboxField,
  FormActions,
  FormAlert,
  FormPanel,
  SelectField,
  StatusLine,
  TextField,
  useSchemaForm,
  type FieldErrors,
} from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

type Panel = { kind: "create" } | { kind: "edit"; compressor: CompressorDto } | null;

export function CompressorsAdmin() {
  const compressors = useQuery(adminQueries.compressors());
  const sites = useQuery(adminQueries.sites());
  const models = useQuery(adminQueries.models());
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);
  const [rowError, setRowError] = useState<string | null>(null);
  const [confirmId, setConfirmId] = useState<number | null>(null);
  const [busyId, setBusyId] = useState<number | null>(null);
  const [credential, setCredential] = useState<DeviceCredential | null>(null);

  async function issue(c: CompressorDto) {
    setBusyId(c.id);
    setRowError(null);
    setStatus(null);
    try {
      const result = await issueDeviceCredential({ id: c.id });
      if (result.ok) {
        setPanel(null);
        setCredential(result.data);
      } else setRowError(result.error);
      await refresh();
    } catch {
      setRowError("The server could not be reached. Check the connection and try again.");
    } finally {
      setBusyId(null);
      setConfirmId(null);
    }
  }

  const columns: DataColumn<CompressorDto>[] = [
    { id: "name", header: "Name", sortValue: (c) => c.name, cell: (c) => c.name },
    { id: "site", header: "Site", sortValue: (c) => c.siteName, cell: (c) => c.siteName },
    { id: "model", header: "Model", sortValue: (c) => c.modelName, cell: (c) => c.modelName },
    { id: "serial", header: "Serial", sortValue: (c) => c.serial, cell: (c) => <span className="num">{c.serial}</span> },
    { id: "deviceId", header: "Device id", sortValue: (c) => c.deviceId, cell: (c) => <span className="num">{c.deviceId}</span> },
    { id: "stop", header: "Stop", numeric: true, sortValue: (c) => c.stopPressureBar, cell: (c) => `${c.stopPressureBar} bar` },
    {
      id: "restart",
      header: "Restart",
      numeric: true,
      sortValue: (c) => c.restartPressureBar,
      cell: (c) => `${c.restartPressureBar} bar`,
    },
    { id: "bank", header: "Bank", numeric: true, sortValue: (c) => c.bankVolumeL, cell: (c) => `${c.bankVolumeL} L` },
    {
      id: "inService",
      header: "Service",
      sortValue: (c) => (c.inService ? "In service" : "Out of service"),
      cell: (c) =>
        c.inService ? (
          <span className="text-xs">In service</span>
        ) : (
          <span className="rounded border border-dashed border-muted px-1 text-xs font-semibold text-muted">Out of service</span>
        ),
    },
    {
      id: "credential",
      header: "Credential",
      sortValue: (c) => (c.hasDeviceCredential ? "Issued" : "None"),
      cell: (c) => (c.hasDeviceCredential ? <span className="text-xs">Issued</span> : <span className="text-xs text-muted">None</span>),
    },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (c) => {
        const busy = busyId === c.id;
        return (
          <div className="flex flex-wrap justify-end gap-1">
            <button
              type="button"
              className={buttonClass.small}
              aria-label={`Edit compressor ${c.name}`}
              onClick={() => {
                setStatus(null);
                setCredential(null);
                setPanel({ kind: "edit", compressor: c });
              }}
            >
              Edit
            </button>
            {confirmId === c.id ? (
              <>
                <button
                  type="button"
                  className={`${buttonClass.small} border-ink font-semibold`}
                  disabled={busy}
                  onClick={() => issue(c)}
                  aria-label={`Confirm: replace the device credential of ${c.name}`}
                >
                  Confirm replace
                </button>
                <button type="button" className={buttonClass.small} onClick={() => setConfirmId(null)}>
                  Keep
                </button>
              </>
            ) : (
              <button
                type="button"
                className={buttonClass.small}
                disabled={busy}
                aria-label={`Issue device credential for ${c.name}`}
                onClick={() => (c.hasDeviceCredential ? setConfirmId(c.id) : issue(c))}
              >
                {busy ? "Issuing…" : "Issue device credential"}
              </button>
            )}
          </div>
        );
      },
    },
  ];

  const noPrerequisites = (sites.data && sites.data.length === 0) || (models.data && models.data.length === 0);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <h1 className="text-xl font-semibold">Compressors</h1>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          disabled={Boolean(noPrerequisites)}
          aria-describedby={noPrerequisites ? "compressor-prerequisites" : undefined}
          onClick={() => {
            setStatus(null);
            setCredential(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a compressor
        </button>
      </div>
      {noPrerequisites && (
        <p id="compressor-prerequisites" className="text-sm text-muted">
          Add at least one site and one compressor model first.
        </p>
      )}
      {credential && <CredentialReveal credential={credential} onClose={() => setCredential(null)} />}
      {panel && (
        <CompressorForm
          key={panel.kind === "edit" ? panel.compressor.id : "new"}
          compressor={panel.kind === "edit" ? panel.compressor : null}
          sites={sites.data ?? []}
          models={models.data ?? []}
          onCancel={() => setPanel(null)}
          onDone={async (c, created) => {
            setPanel(null);
            setStatus(
              created
                ? `Added compressor ${c.name}. Issue its device credential so its gateway can publish.`
                : `Saved compressor ${c.name}.`,
            );
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
      {compressors.error && <p role="alert">Could not load compressors: {compressors.error.message}</p>}
      <DataTable
        data-testid="compressors-table"
        caption="Compressors"
        rows={compressors.data ?? []}
        columns={columns}
        rowKey={(c) => c.id}
        initialSort={{ columnId: "site", direction: "asc" }}
        loading={compressors.isPending}
        emptyText="No compressors yet."
        rowProps={(c) => ({ "data-testid": "compressor-row", className: c.inService ? undefined : "text-muted" })}
      />
    </div>
  );
}

type CompressorValues = {
  name: string;
  siteId: string;
  modelId: string;
  serial: string;
  deviceId: string;
  stopPressureBar: string;
  restartPressureBar: string;
  bankVolumeL: string;
  inService: boolean;
};

function CompressorForm({
  compressor,
  sites,
  models,
  onDone,
  onCancel,
}: {
  compressor: CompressorDto | null;
  sites: SiteDto[];
  models: CompressorModelDto[];
  onDone: (c: CompressorDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const c = compressor;
  const initial: CompressorValues = {
    name: c?.name ?? "",
    siteId: c ? String(c.siteId) : "",
    modelId: c ? String(c.modelId) : "",
    serial: c?.serial ?? "",
    deviceId: c?.deviceId ?? "",
    stopPressureBar: c ? String(c.stopPressureBar) : "",
    restartPressureBar: c ? String(c.restartPressureBar) : "",
    bankVolumeL: c ? String(c.bankVolumeL) : "",
    inService: c?.inService ?? true,
  };
  const modelOf = (v: CompressorValues) => models.find((m) => String(m.id) === v.modelId);
  const form = useSchemaForm({
    schema: c ? compressorUpdateSchema : compressorInputSchema,
    initial,
    toInput: (v) => (c ? { ...v, id: c.id } : v),
    check: (v): FieldErrors => {
      const model = modelOf(v);
      const stop = Number(v.stopPressureBar);
      if (!model || v.stopPressureBar.trim() === "" || !Number.isFinite(stop)) return {};
      const problem = stopPressureProblem(stop, model.ratedPressureBar);
      return problem ? { stopPressureBar: [problem] } : {};
    },
  });
  const model = modelOf(form.values);
  const topicsChange =
    c != null &&
    c.hasDeviceCredential &&
    (form.values.deviceId.trim() !== c.deviceId || form.values.siteId !== String(c.siteId));
  const title = c ? `Edit compressor ${c.name}` : "Add a compressor";
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-3"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(c ? updateCompressor : createCompressor);
          if (saved) onDone(saved, !c);
        }}
      >
        <TextField form={form} name="name" label="Name" maxLength={120} />
        <SelectField
          form={form}
          name="siteId"
          label="Site"
          placeholder="Choose a site…"
          options={sites.map((s) => ({ value: String(s.id), label: `${s.name} (${s.code})` }))}
        />
        <SelectField
          form={form}
          name="modelId"
          label="Model"
          placeholder="Choose a model…"
          options={models.map((m) => ({ value: String(m.id), label: `${m.name} · ${m.stages} stages · ${m.ratedPressureBar} bar` }))}
        />
        <TextField form={form} name="serial" label="Serial number" maxLength={60} />
        <TextField
          form={form}
          name="deviceId"
          label="Device id"
          maxLength={63}
          hint={
            topicsChange
              ? "Changing the device id or site changes the device's MQTT username or topics; reconfigure its gateway."
              : "Lower-case letters, digits and hyphens; also the device's MQTT username."
          }
        />
        <CheckboxField form={form} name="inService" label="In service" hint="Clear while the unit is decommissioned or away for overhaul." className="self-center" />
        <TextField
          form={form}
          name="stopPressureBar"
          label="Stop pressure"
          unit="bar"
          numeric
          hint={`As set on the machine, recorded here for display; Airkeep never changes it. ${model ? `The model is rated ${model.ratedPressureBar} bar.` : "At most the model's rated pressure."}`}
        />
        <TextField form={form} name="restartPressureBar" label="Restart pressure" unit="bar" numeric hint="As set on the machine, recorded here for display; below the stop pressure." />
        <TextField form={form} name="bankVolumeL" label="Bank volume" unit="L" numeric hint="Water capacity of the storage bank; 0 if none." />
        <div className="space-y-2 md:col-span-3">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={c ? "Save compressor" : "Add compressor"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}

function CredentialReveal({ credential, onClose }: { credential: DeviceCredential; onClose: () => void }) {
  const headingId = useId();
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), [credential.secret]);
  const rows: [string, string][] = [
    ["MQTT username", credential.username],
    ["MQTT password", credential.secret],
    ["Topic prefix", credential.topicPrefix],
  ];
  return (
    <section aria-labelledby={headingId} className="rounded border-2 border-ink bg-raised p-3" data-testid="device-credential">
      <h2 id={headingId} ref={headingRef} tabIndex={-1} className="text-base font-semibold outline-none">
        Device credential for {credential.compressorName}
      </h2>
      <p className="mt-1 text-sm">
        Shown only now. Airkeep keeps only a hash of the password; if it is lost, issue a new one. Any earlier credential of
        this device no longer works.
      </p>
      <dl className="mt-2 grid grid-cols-[max-content_1fr_max-content] items-center gap-x-3 gap-y-1 text-sm">
        {rows.map(([label, value]) => (
          <CredentialRow key={label} label={label} value={value} />
        ))}
      </dl>
      <p className="mt-2 text-xs text-muted">
        The device publishes its telemetry, status and event messages under the topic prefix, and nowhere else.
      </p>
      <button type="button" className={`${buttonClass.primary} mt-2`} onClick={onClose}>
        Done, I have copied it
      </button>
    </section>
  );
}

function CredentialRow({ label, value }: { label: string; value: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <>
      <dt className="text-xs font-semibold text-muted">{label}</dt>
      <dd className="num break-all select-all" data-testid={`credential-${label.toLowerCase().replace(/\s+/g, "-")}`}>
        {value}
      </dd>
      <dd>
        <button
          type="button"
          className={buttonClass.small}
          aria-label={`Copy ${label}`}
          onClick={async () => {
            try {
              await navigator.clipboard.writeText(value);
              setCopied(true);
            } catch {
              setCopied(false);
            }
          }}
        >
          {copied ? "Copied" : "Copy"}
        </button>
      </dd>
    </>
  );
}
