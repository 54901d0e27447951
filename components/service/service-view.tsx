"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { usePathname, useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { resetServiceInterval } from "@/lib/actions/service";
import { serviceKey, serviceQueries, serviceQueryString, type ServiceFilter } from "@/components/queries/service";
import { FilterSelect } from "@/components/filter-select";
import { formatZoned } from "@/shared/zoned-time";
import type { ServiceDueDto } from "@/shared/service-schema";
import { denialReason } from "@/shared/roles";
import { statusRank } from "@/shared/service-due";
import { dueText, intervalText, num, StatusChip } from "./due-format";
import { LogForm, type LogPrefill } from "./log-form";
import { ServiceLogList } from "./log-list";
import { PlanEditor } from "./plan-editor";
import { WindowsPanel } from "./windows-panel";

type SortKey = "status" | "forecast" | "compressor" | "task" | "site";

function compare(a: ServiceDueDto, b: ServiceDueDto, key: SortKey): number {
  switch (key) {
    case "status":
      return statusRank[a.status] - statusRank[b.status] || (a.forecastAt ?? Infinity) - (b.forecastAt ?? Infinity);
    case "forecast":
      return (a.forecastAt ?? Infinity) - (b.forecastAt ?? Infinity);
    case "compressor":
      return a.compressorName.localeCompare(b.compressorName) || a.name.localeCompare(b.name);
    case "task":
      return a.name.localeCompare(b.name) || a.compressorName.localeCompare(b.compressorName);
    case "site":
      return a.siteName.localeCompare(b.siteName) || a.compressorName.localeCompare(b.compressorName);
  }
}

function newSubmissionId(): string {
  return crypto.randomUUID().replace(/-/g, "");
}

export function ServiceView({
  initialFilter,
  canLog,
  canReset,
  canCorrect,
  canPlan,
}: {
  initialFilter: ServiceFilter;
  canLog: boolean;
  canReset: boolean;
  canCorrect: boolean;
  canPlan: boolean;
}) {
  const router = useRouter();
  const pathname = usePathname();
  const qc = useQueryClient();
  const [filter, setFilter] = useState<ServiceFilter>(initialFilter);
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: "status", dir: 1 });
  const [prefill, setPrefill] = useState<LogPrefill | null>(null);
  const { data, error } = useQuery(serviceQueries.overview(filter));
  const refresh = () => qc.invalidateQueries({ queryKey: serviceKey });

  const applyFilter = (next: ServiceFilter) => {
    setFilter(next);
    const qs = serviceQueryString({ site: next.site, compressor: next.compressor });
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  };

  const rows = useMemo(() => [...(data?.due ?? [])].sort((a, b) => sort.dir * compare(a, b, sort.key)), [data, sort]);
  const counts = useMemo(() => ({ overdue: rows.filter((r) => r.status === "overdue").length, due: rows.filter((r) => r.status === "due").length }), [rows]);

  if (!data) return <p className="text-muted">{error ? `Could not load the service status: ${error.message}` : "Loading…"}</p>;
  const compressorOptions = data.compressors.filter((c) => !filter.site || c.siteId === filter.site).map((c) => ({ value: String(c.id), label: c.name }));

  const header = (key: SortKey, label: string) => (
    <th scope="col" className="px-2 py-1 text-left" aria-sort={sort.key === key ? (sort.dir === 1 ? "ascending" : "descending") : "none"}>
      <button type="button" className="font-semibold text-ink hover:underline" onClick={() => setSort((s) => ({ key, dir: s.key === key ? (-s.dir as 1 | -1) : 1 }))}>
        {label}
        {sort.key === key ? (sort.dir === 1 ? " ▲" : " ▼") : ""}
      </button>
    </th>
  );

  return (
    <section className="space-y-6">
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">Service</h1>
        <p className="text-sm text-muted">
          Tasks fall due by run hours or by the calendar in the site&apos;s time zone, whichever comes first. Airkeep is a monitoring aid: the
          maker&apos;s instructions, local regulations and licensed practice set what is done and when. A spent purifier cartridge or overdue
          oil change can contaminate breathing air.
        </p>
      </header>

      <div className="flex flex-wrap items-end gap-3">
        <FilterSelect
          label="Site"
          value={filter.site}
          options={data.sites.map((s) => ({ value: String(s.id), label: s.name }))}
          onChange={(v) => applyFilter({ ...filter, site: v ? Number(v) : undefined, compressor: undefined })}
        />
        <FilterSelect label="Compressor" value={filter.compressor} options={compressorOptions} onChange={(v) => applyFilter({ ...filter, compressor: v ? Number(v) : undefined })} />
        <p className="text-sm text-muted" data-testid="service-counts">
          <span className="num font-semibold text-ink">{counts.overdue}</span> overdue · <span className="num font-semibold text-ink">{counts.due}</span> due soon · lead{" "}
          <span className="num">{data.lead.leadHours} h</span> / <span className="num">{data.lead.leadDays} days</span>
        </p>
      </div>

      <div className="overflow-x-auto rounded border border-line bg-raised">
        <table className="w-full text-sm" data-testid="due-table">
          <caption className="sr-only">Service tasks, overdue first</caption>
          <thead className="border-b border-line bg-panel">
            <tr>
              {header("status", "Status")}
              {header("compressor", "Compressor")}
              {header("site", "Site")}
              {header("task", "Task")}
              <th scope="col" className="px-2 py-1 text-left">Interval</th>
              <th scope="col" className="px-2 py-1 text-left">Last done</th>
              <th scope="col" className="px-2 py-1 text-left">Due</th>
              {header("forecast", "Expected")}
              <th scope="col" className="px-2 py-1 text-left"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody>
            {rows.length === 0 && (
              <tr>
                <td colSpan={9} className="px-2 py-3 text-muted">No service tasks for these compressors. Plans are set per model, with per-compressor overrides.</td>
              </tr>
            )}
            {rows.map((d) => (
              <DueRow
                key={`${d.compressorId}-${d.code}`}
                d={d}
                canLog={canLog}
                canReset={canReset}
                onLog={() => setPrefill({ compressorId: d.compressorId, tasks: [d.code], key: Date.now() })}
                onReset={refresh}
              />
            ))}
          </tbody>
        </table>
      </div>

      {canLog ? (
        <LogForm key={prefill?.key ?? 0} data={data} prefill={prefill} newSubmissionId={newSubmissionId} onLogged={refresh} />
      ) : (
        <p className="text-sm text-muted" data-testid="log-denied">
          Recording service: {denialReason("service.log")}
        </p>
      )}

      <ServiceLogList data={data} q={filter.q ?? ""} onSearch={(q) => setFilter({ ...filter, q: q || undefined })} canCorrect={canCorrect} onChanged={refresh} />

      <WindowsPanel data={data} canAdd={canLog} onAdded={refresh} />

      {canPlan && <PlanEditor data={data} onChanged={refresh} />}
    </section>
  );
}

function DueRow({ d, canLog, canReset, onLog, onReset }: { d: ServiceDueDto; canLog: boolean; canReset: boolean; onLog: () => void; onReset: () => void }) {
  const [resetting, setResetting] = useState(false);
  const [reason, setReason] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [submissionId] = useState(newSubmissionId);
  const reset = async () => {
    setBusy(true);
    const r = await resetServiceInterval({ compressorId: d.compressorId, code: d.code, reason, submissionId });
    setBusy(false);
    if (r.ok) {
      setResetting(false);
      onReset();
    } else setMessage(r.fieldErrors?.reason?.[0] ?? r.error);
  };
  return (
    <tr className="border-b border-line last:border-0" data-testid="due-row" data-status={d.status} data-code={d.code} data-compressor={d.compressorName}>
      <td className="px-2 py-1">
        <StatusChip status={d.status} />
      </td>
      <td className="px-2 py-1 font-semibold">{d.compressorName}</td>
      <td className="px-2 py-1 text-muted">{d.siteName}</td>
      <td className="px-2 py-1">{d.name}</td>
      <td className="num px-2 py-1">{intervalText(d)}</td>
      <td className="num px-2 py-1">
        {d.lastAt !== null ? formatZoned(d.lastAt, d.timeZone).slice(0, 10) : <span className="text-muted">never logged</span>}
        {d.lastHours !== null && <span className="text-muted"> · {num(d.lastHours)} h</span>}
      </td>
      <td className="num px-2 py-1">{dueText(d)}</td>
      <td className="num px-2 py-1">
        {d.forecastAt !== null ? formatZoned(d.forecastAt, d.timeZone).slice(0, 10) : "—"}
        {d.firstBy && <span className="text-muted"> ({d.firstBy === "hours" ? "run hours" : "calendar"})</span>}
      </td>
      <td className="px-2 py-1 whitespace-nowrap">
        {canLog && (
          <button type="button" className="rounded border border-line px-2 py-0.5 text-xs font-semibold hover:bg-panel" onClick={onLog} aria-label={`Log ${d.name} on ${d.compressorName}`}>
            Log
          </button>
        )}
        {canReset && !resetting && (
          <button type="button" className="ml-1 rounded border border-line px-2 py-0.5 text-xs hover:bg-panel" onClick={() => setResetting(true)} aria-label={`Reset interval of ${d.name} on ${d.compressorName}`}>
            Reset
          </button>
        )}
        {resetting && (
          <span className="ml-1 inline-flex items-center gap-1">
            <label className="sr-only" htmlFor={`reset-${d.compressorId}-${d.code}`}>Reason for the reset</label>
            <input id={`reset-${d.compressorId}-${d.code}`} value={reason} onChange={(e) => setReason(e.target.value)} placeholder="Reason" className="w-32 rounded border border-line px-1 py-0.5 text-xs" />
            <button type="button" disabled={busy} className="rounded border border-line px-2 py-0.5 text-xs font-semibold" onClick={reset}>
              Reset now
            </button>
            {message && <span className="text-xs text-ink" role="alert">{message}</span>}
          </span>
        )}
      </td>
    </tr>
  );
}

