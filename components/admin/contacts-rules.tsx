"use client";

import { useState } from "react";
import { createRule, deleteRule, updateRule } from "@/lib/actions/admin-contacts";
import { DataTable, type DataColumn } from "@/components/data-table";
import type { ContactsPageData } from "@/components/queries/mail";
import { priorities, type Priority } from "@/shared/alarm-rules";
import { ruleInputSchema, ruleUpdateSchema, type RuleDto } from "@/shared/contact-schema";
import { routeAlarm } from "@/shared/notify-routing";
import { ConfirmDelete, PriorityName } from "./contacts-parts";
import { buttonClass, CheckboxField, FormActions, FormAlert, FormPanel, SelectField, StatusLine, TextField, useSchemaForm } from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

const minPriorityLabel: Record<Priority, string> = {
  critical: "Critical only",
  warning: "Warning and critical",
  advisory: "Every priority",
};

type Panel = { kind: "create" } | { kind: "edit"; rule: RuleDto } | null;

export function RulesSection({ data, loading }: { data: ContactsPageData | undefined; loading: boolean }) {
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);
  const defaultWait = data?.defaultEscalateAfterMin ?? 15;

  const columns: DataColumn<RuleDto>[] = [
    { id: "position", header: "Order", numeric: true, sortValue: (r) => r.position, cell: (r) => r.position },
    { id: "site", header: "Site", sortValue: (r) => r.siteName ?? "", cell: (r) => r.siteName ?? <em>Every site</em> },
    {
      id: "priority",
      header: "Alarms",
      sortValue: (r) => priorities.indexOf(r.minPriority),
      cell: (r) => <PriorityName priority={r.minPriority} suffix={r.minPriority === "critical" ? " only" : " and above"} />,
    },
    {
      id: "who",
      header: "Who",
      sortValue: (r) => (r.target === "on-call" ? "" : (r.contactName ?? "")),
      cell: (r) => (r.target === "on-call" ? <span>Whoever is on call at the alarm&apos;s site</span> : r.contactName),
    },
    {
      id: "mode",
      header: "How",
      sortValue: (r) => r.mode,
      cell: (r) => (r.mode === "chain" ? "Escalation chain" : "Copy of first notice and all-clear"),
    },
    {
      id: "wait",
      header: "Escalate after",
      numeric: true,
      sortValue: (r) => r.escalateAfterMin ?? defaultWait,
      cell: (r) => (r.mode === "copy" ? "—" : r.escalateAfterMin != null ? `${r.escalateAfterMin} min` : `${defaultWait} min (default)`),
    },
    {
      id: "enabled",
      header: "In use",
      sortValue: (r) => (r.enabled ? "Yes" : "No"),
      cell: (r) => (r.enabled ? "Yes" : <span className="rounded border border-dashed border-muted px-1 text-xs font-semibold text-muted">Off</span>),
    },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (r) => (
        <div className="flex flex-wrap justify-end gap-1">
          <button
            type="button"
            className={buttonClass.small}
            aria-label={`Edit rule ${r.position}`}
            onClick={() => {
              setStatus(null);
              setPanel({ kind: "edit", rule: r });
            }}
          >
            Edit
          </button>
          <ConfirmDelete
            label={`Delete rule ${r.position}`}
            onConfirm={async () => {
              const res = await deleteRule({ id: r.id });
              if (!res.ok) return res.error;
              setPanel(null);
              setStatus("Rule deleted.");
              await refresh();
              return null;
            }}
          />
        </div>
      ),
    },
  ];

  return (
    <section aria-labelledby="rules-heading" className="space-y-2">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="rules-heading" className="text-lg font-semibold">
          Notification rules
        </h2>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          disabled={!data}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a rule
        </button>
      </div>
      <p className="max-w-3xl text-sm text-muted">
        For each alarm, the rules that match its site and priority are taken in order. Chain rules make the escalation
        order: the first person is e-mailed at once; if nobody acknowledges within the wait, the next one is, and so on. An
        on-call rule stands for the people on call at the alarm&apos;s site at that moment, in rota order. Copy rules get the
        first notice and the all-clear, never escalations. More than the digest threshold of alarms at one site within ten
        minutes are sent as one digest.
      </p>
      {panel && data && (
        <RuleForm
          key={panel.kind === "edit" ? panel.rule.id : "new"}
          rule={panel.kind === "edit" ? panel.rule : null}
          data={data}
          onCancel={() => setPanel(null)}
          onDone={async (_r, created) => {
            setPanel(null);
            setStatus(created ? "Rule added." : "Rule saved.");
            await refresh();
          }}
        />
      )}
      <StatusLine message={status} />
      <DataTable
        data-testid="rules-table"
        caption="Notification rules"
        rows={data?.rules ?? []}
        columns={columns}
        rowKey={(r) => r.id}
        initialSort={{ columnId: "position", direction: "asc" }}
        loading={loading}
        emptyText="No rules yet: nobody is e-mailed about alarms."
        rowProps={(r) => ({ "data-testid": "rule-row", className: r.enabled ? undefined : "text-muted" })}
      />
      {data && <ChainPreview data={data} />}
    </section>
  );
}

/** Who would be told, in which order, about an alarm raised now at a chosen site and priority. */
function ChainPreview({ data }: { data: ContactsPageData }) {
  const [siteId, setSiteId] = useState<number | null>(data.sites[0]?.id ?? null);
  const [priority, setPriority] = useState<Priority>("critical");
  if (siteId === null) return null;
  const onCall = data.onCallNow.find((s) => s.siteId === siteId)?.contacts.map((c) => c.id) ?? [];
  const activeIds = new Set(data.contacts.filter((c) => c.active).map((c) => c.id));
  const routing = routeAlarm({
    rules: data.rules,
    siteId,
    priority,
    onCall,
    activeContactIds: activeIds,
    defaultEscalateAfterMs: data.defaultEscalateAfterMin * 60_000,
  });
  const name = (id: number) => data.contacts.find((c) => c.id === id)?.name ?? `Contact ${id}`;
  return (
    <div className="rounded border border-line bg-panel p-3 text-sm" data-testid="chain-preview">
      <div className="flex flex-wrap items-end gap-3">
        <label className="text-xs font-semibold text-muted">
          An alarm now at
          <select className="mt-0.5 block rounded border border-line bg-white px-2 py-1 text-sm text-ink" value={siteId} onChange={(e) => setSiteId(Number(e.target.value))}>
            {data.sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label className="text-xs font-semibold text-muted">
          of priority
          <select className="mt-0.5 block rounded border border-line bg-white px-2 py-1 text-sm text-ink" value={priority} onChange={(e) => setPriority(e.target.value as Priority)}>
            {priorities.map((p) => (
              <option key={p} value={p}>
                {p[0]!.toUpperCase() + p.slice(1)}
              </option>
            ))}
          </select>
        </label>
      </div>
      {routing.chain.length === 0 && routing.copies.length === 0 ? (
        <p className="mt-2 font-semibold">Nobody would be e-mailed.</p>
      ) : (
        <ol className="mt-2 list-decimal space-y-0.5 pl-5">
          {routing.chain.map((r, i) => {
            const at = routing.chain.slice(0, i).reduce((sum, s) => sum + s.escalateAfterMs / 60_000, 0);
            return (
              <li key={r.contactId}>
                {name(r.contactId)}{" "}
                <span className="text-muted">{i === 0 ? "at once" : `if not acknowledged after ${at} min`}</span>
              </li>
            );
          })}
        </ol>
      )}
      {routing.copies.length > 0 && <p className="mt-1 text-muted">Copied: {routing.copies.map((r) => name(r.contactId)).join(", ")}</p>}
    </div>
  );
}

type RuleValues = {
  siteId: string;
  minPriority: string;
  target: string;
  contactId: string;
  mode: string;
  position: string;
  escalateAfterMin: string;
  enabled: boolean;
};

function RuleForm({
  rule,
  data,
  onDone,
  onCancel,
}: {
  rule: RuleDto | null;
  data: ContactsPageData;
  onDone: (r: RuleDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const r = rule;
  const nextPosition = Math.max(-10, ...data.rules.map((x) => x.position)) + 10;
  const initial: RuleValues = {
    siteId: r?.siteId != null ? String(r.siteId) : "",
    minPriority: r?.minPriority ?? "warning",
    target: r?.target ?? "contact",
    contactId: r?.contactId != null ? String(r.contactId) : "",
    mode: r?.mode ?? "chain",
    position: String(r?.position ?? Math.min(999, nextPosition)),
    escalateAfterMin: r?.escalateAfterMin != null ? String(r.escalateAfterMin) : "",
    enabled: r?.enabled ?? true,
  };
  const form = useSchemaForm({
    schema: r ? ruleUpdateSchema : ruleInputSchema,
    initial,
    toInput: (v) => ({ ...v, contactId: v.target === "contact" ? v.contactId : "", ...(r ? { id: r.id } : {}) }),
  });
  const title = r ? "Edit rule" : "Add a rule";
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-3"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(r ? updateRule : createRule);
          if (saved) onDone(saved, !r);
        }}
      >
        <SelectField form={form} name="siteId" label="Site" placeholder="Every site" options={data.sites.map((s) => ({ value: String(s.id), label: s.name }))} />
        <SelectField form={form} name="minPriority" label="Alarms" options={priorities.map((p) => ({ value: p, label: minPriorityLabel[p] }))} />
        <SelectField
          form={form}
          name="target"
          label="Who"
          options={[
            { value: "contact", label: "A contact" },
            { value: "on-call", label: "Whoever is on call at the alarm's site" },
          ]}
        />
        <SelectField
          form={form}
          name="contactId"
          label="Contact"
          placeholder={form.values.target === "contact" ? "Choose a contact…" : "Taken from the rota"}
          disabled={form.values.target !== "contact"}
          options={data.contacts.map((c) => ({ value: String(c.id), label: c.active ? c.name : `${c.name} (paused)` }))}
        />
        <SelectField
          form={form}
          name="mode"
          label="How"
          options={[
            { value: "chain", label: "Escalation chain" },
            { value: "copy", label: "Copy (first notice and all-clear)" },
          ]}
        />
        <TextField form={form} name="position" label="Order" numeric maxLength={3} hint="Lower goes first; ties by creation." />
        <TextField
          form={form}
          name="escalateAfterMin"
          label="Escalate after"
          unit="min"
          numeric
          maxLength={4}
          disabled={form.values.mode === "copy"}
          hint={`How long to wait for an acknowledgement before the next in the chain. Empty: ${data.defaultEscalateAfterMin} min.`}
        />
        <CheckboxField form={form} name="enabled" label="In use" className="self-center" />
        <div className="space-y-2 md:col-span-3">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={r ? "Save rule" : "Add rule"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
