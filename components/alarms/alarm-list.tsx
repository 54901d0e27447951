"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect, useId, useMemo, useRef, useState } from "react";
import type { AlarmActionOutcome } from "@/lib/actions/alarms";
import { alarmStates, stateLabels, type AlarmState } from "@/shared/alarm-lifecycle";
import { priorities, priorityRank, type Priority } from "@/shared/alarm-rules";
import type { AlarmDto } from "@/shared/alarm-schema";
import { can, denialReason, type Permission, type Role } from "@/shared/roles";
import type { UnitPreference } from "@/shared/units";
import { buttonClass, StatusLine } from "../admin/form-kit";
import { DataTable, type DataColumn } from "../data-table";
import { formatZoned, offsetLabel } from "@/shared/zoned-time";
import { noteServerTime, useServerNow } from "../live/server-clock";
import { alarmQueries, alarmsKey, applyAlarmUpdates } from "../queries/alarms";
import { useUnits } from "../use-units";
import { AlarmActionPanel } from "./alarm-action-panel";
import { actionApplies, formatAlarmAge, valueVsLimit, type AlarmActionKind } from "./format";
import { alarmListQuery, type AlarmListParams } from "@/shared/alarm-list-params";
import { PriorityMark, priorityWords } from "./priority-mark";
import { FilterSelect } from "@/components/filter-select";

export type AlarmSiteOption = { id: number; name: string };
export type AlarmCompressorOption = { id: number; name: string; siteId: number };

const actionPermission: Record<AlarmActionKind, Permission> = {
  acknowledge: "alarms.acknowledge",
  shelve: "alarms.shelve",
  "out-of-service": "alarms.shelve",
  "return-to-service": "alarms.shelve",
};

const actionLabel: Record<AlarmActionKind, string> = {
  acknowledge: "Acknowledge",
  shelve: "Shelve",
  "out-of-service": "Out of service",
  "return-to-service": "Return to service",
};

const listedStates = alarmStates.filter((s) => s !== "normal");

function describe(a: AlarmDto): string {
  return `${priorityWords[a.priority]}: ${a.title} — ${a.compressorName}, ${a.siteName}`;
}

function StateCell({ a }: { a: AlarmDto }) {
  const time = (ms: number) => `${formatZoned(ms, a.timeZone).slice(11, 16)} ${offsetLabel(ms, a.timeZone)}`;
  return (
    <div className="min-w-40">
      <span className="font-semibold" data-testid="alarm-state" data-state={a.state}>
        {stateLabels[a.state]}
      </span>
      {a.state === "active-acknowledged" && a.ackByName && (
        <p className="text-xs text-muted">
          by {a.ackByName}
          {a.ackComment ? `: “${a.ackComment}”` : ""}
        </p>
      )}
      {a.state === "shelved" && a.shelvedUntil && (
        <p className="text-xs text-muted">
          until <span className="num">{time(a.shelvedUntil)}</span>
          {a.shelveComment ? `: “${a.shelveComment}”` : ""}
        </p>
      )}
      {a.state === "out-of-service" && a.outOfServiceReason && <p className="text-xs text-muted">“{a.outOfServiceReason}”</p>}
      {!a.active && a.state !== "normal" && <p className="text-xs text-muted">Condition no longer present</p>}
    </div>
  );
}

function ActionButtons({
  a,
  role,
  reasonIds,
  onAction,
}: {
  a: AlarmDto;
  role: Role;
  reasonIds: Record<Permission, string>;
  onAction: (kind: AlarmActionKind, alarms: AlarmDto[]) => void;
}) {
  const kinds = (["acknowledge", "shelve", "out-of-service", "return-to-service"] as const).filter((k) => actionApplies(k, a.state));
  if (!kinds.length) return <span className="text-xs text-muted">—</span>;
  return (
    <div className="flex flex-wrap gap-1">
      {kinds.map((k) => {
        const permission = actionPermission[k];
        const allowed = can(role, permission);
        return (
          <button
            key={k}
            type="button"
            className={buttonClass.small}
            disabled={!allowed}
            aria-describedby={allowed ? undefined : reasonIds[permission]}
            title={allowed ? undefined : denialReason(permission)}
            data-action={k}
            onClick={() => onAction(k, [a])}
          >
            {actionLabel[k]}
            <span className="sr-only">: {describe(a)}</span>
          </button>
        );
      })}
    </div>
  );
}

/**
 * The active alarm list: every alarm of the person's sites that is not back to normal, critical first, then newest.
 * Polled every few seconds; filters are kept in the address (so a link opens the same view). Acknowledge and shelve
 * from a row or for the selected rows; the controls a role may not use stay visible, disabled, with the reason.
 */
export function AlarmList({
  role,
  sites,
  compressors,
  initial,
  highlightId,
}: {
  role: Role;
  sites: AlarmSiteOption[];
  compressors: AlarmCompressorOption[];
  initial: AlarmListParams;
  highlightId: number | null;
}) {
  const client = useQueryClient();
  const pathname = usePathname();
  const units = useUnits();
  const baseId = useId();
  const [filter, setFilter] = useState<AlarmListParams>(initial);
  const [selected, setSelected] = useState<ReadonlySet<number>>(new Set());
  const [pending, setPending] = useState<{ kind: AlarmActionKind; alarms: AlarmDto[] } | null>(null);
  const [status, setStatus] = useState<string | null>(null);
  const [refusals, setRefusals] = useState<{ id: number; reason: string; name: string }[]>([]);

  const list = useQuery(alarmQueries.list());
  const highlighted = useQuery({ ...alarmQueries.one(highlightId ?? 0), enabled: highlightId !== null });
  useEffect(() => {
    if (list.data) noteServerTime(list.data.at);
  }, [list.data]);
  const now = useServerNow(list.data?.at ?? 0);

  const all = useMemo(() => list.data?.alarms ?? [], [list.data]);
  const shown = useMemo(
    () =>
      all.filter(
        (a) =>
          (filter.site === undefined || a.siteId === filter.site) &&
          (filter.compressor === undefined || a.compressorId === filter.compressor) &&
          (filter.priority === undefined || a.priority === filter.priority) &&
          (filter.state === undefined || a.state === filter.state),
      ),
    [all, filter],
  );

  // Selection follows what is shown: an alarm that leaves the list (or the filter) leaves the selection.
  const shownIds = useMemo(() => new Set(shown.map((a) => a.id)), [shown]);
  const selectedShown = shown.filter((a) => selected.has(a.id));

  function applyFilter(next: AlarmListParams) {
    setFilter(next);
    const q = alarmListQuery(next);
    const id = highlightId !== null ? `${q ? "&" : ""}id=${highlightId}` : "";
    // The address follows the filters without a round trip to the server (Next keeps useSearchParams in step).
    window.history.replaceState(null, "", `${pathname}${q || id ? `?${q}${id}` : ""}`);
  }

  // An e-mail's link: bring the alarm into view once, and give it focus.
  const focused = useRef(false);
  useEffect(() => {
    if (focused.current || highlightId === null || !list.data) return;
    const row = document.querySelector<HTMLElement>(`[data-alarm-id="${highlightId}"]`);
    const card = document.getElementById(`${baseId}-highlight`);
    const target = row ?? card;
    if (target) {
      focused.current = true;
      target.scrollIntoView({ block: "center" });
      target.focus({ preventScroll: true });
    }
  }, [highlightId, list.data, highlighted.data, baseId]);

  function onAction(kind: AlarmActionKind, alarms: AlarmDto[]) {
    setStatus(null);
    setRefusals([]);
    setPending({ kind, alarms });
  }

  function onDone(outcome: AlarmActionOutcome, message: string) {
    applyAlarmUpdates(client, outcome.alarms);
    void client.invalidateQueries({ queryKey: alarmsKey });
    const names = new Map((pending?.alarms ?? []).map((a) => [a.id, describe(a)]));
    setRefusals(outcome.refused.map((r) => ({ ...r, name: names.get(r.id) ?? `Alarm ${r.id}` })));
    setStatus(outcome.done.length ? message : "Nothing was changed.");
    setSelected((s) => new Set([...s].filter((id) => !outcome.done.includes(id))));
    setPending(null);
  }

  const reasonIds = {} as Record<Permission, string>;
  for (const p of ["alarms.acknowledge", "alarms.shelve"] as const) reasonIds[p] = `${baseId}-deny-${p.replace(".", "-")}`;
  const denied = (["alarms.acknowledge", "alarms.shelve"] as const).filter((p) => !can(role, p));

  const allShownSelected = shown.length > 0 && shown.every((a) => selected.has(a.id));
  const columns: DataColumn<AlarmDto>[] = [
    {
      id: "select",
      header: (
        <input
          type="checkbox"
          aria-label="Select every alarm shown"
          className="h-4 w-4 accent-ink"
          checked={allShownSelected}
          onChange={(e) => setSelected(e.target.checked ? new Set(shownIds) : new Set())}
        />
      ),
      cell: (a) => (
        <input
          type="checkbox"
          aria-label={`Select ${describe(a)}`}
          className="h-4 w-4 accent-ink"
          checked={selected.has(a.id)}
          onChange={(e) =>
            setSelected((s) => {
              const next = new Set(s);
              if (e.target.checked) next.add(a.id);
              else next.delete(a.id);
              return next;
            })
          }
        />
      ),
      headerClassName: "w-8",
    },
    {
      id: "priority",
      header: "Priority",
      cell: (a) => <PriorityMark priority={a.priority} chip />,
      sortValue: (a) => priorityRank[a.priority],
    },
    {
      id: "alarm",
      header: "Alarm",
      cell: (a) => (
        <div className="min-w-48">
          <span className="font-semibold">{a.title}</span>
          {a.chattering && <span className="ml-1 rounded border border-ink px-1 text-xs font-semibold">Chattering</span>}
        </div>
      ),
      sortValue: (a) => a.title,
    },
    {
      id: "where",
      header: "Compressor · site",
      cell: (a) => (
        <div className="min-w-36">
          <Link href={`/compressors/${a.compressorId}`} className="font-medium text-ink">
            {a.compressorName}
          </Link>
          <br />
          <Link href={`/events?site=${a.siteId}`} className="text-xs text-muted">
            {a.siteName}
          </Link>
        </div>
      ),
      sortValue: (a) => `${a.compressorName} ${a.siteName}`,
    },
    {
      id: "value",
      header: "Value · limit",
      cell: (a) => <span className="num text-sm whitespace-nowrap">{valueVsLimit(a, units) || "—"}</span>,
    },
    {
      id: "raised",
      header: "Age",
      cell: (a) => (
        <div className="whitespace-nowrap">
          <span className="num font-semibold" data-testid="alarm-age">
            {formatAlarmAge(now - a.raisedAt)}
          </span>
          <br />
          <span className="num text-xs text-muted" title={`Raised ${formatZoned(a.raisedAt, a.timeZone)} ${a.timeZone}`}>
            {formatZoned(a.raisedAt, a.timeZone).slice(5, 16)} {offsetLabel(a.raisedAt, a.timeZone)}
          </span>
        </div>
      ),
      sortValue: (a) => -a.raisedAt,
    },
    {
      id: "state",
      header: "State",
      cell: (a) => <StateCell a={a} />,
      sortValue: (a) => stateLabels[a.state],
    },
    {
      id: "actions",
      header: "Actions",
      cell: (a) => <ActionButtons a={a} role={role} reasonIds={reasonIds} onAction={onAction} />,
    },
  ];

  const counts = priorities.map((p) => ({ p, n: shown.filter((a) => a.priority === p).length })).filter((x) => x.n > 0);
  const compressorOptions = compressors.filter((c) => filter.site === undefined || c.siteId === filter.site);
  const highlightInList = highlightId !== null && all.some((a) => a.id === highlightId);
  const selectionKinds = (["acknowledge", "shelve"] as const).map((k) => ({
    kind: k,
    alarms: selectedShown.filter((a) => actionApplies(k, a.state)),
  }));

  return (
    <div className="space-y-3" data-testid="alarm-list">
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h1 className="text-2xl font-semibold">Alarms</h1>
        <p className="num text-sm text-muted" data-testid="alarm-summary">
          {shown.length} not back to normal
          {counts.map(({ p, n }) => ` · ${n} ${priorityWords[p].toLowerCase()}`).join("")}
        </p>
        <p role="status" className="text-xs text-muted">
          {list.isError ? `Could not refresh: ${list.error.message}. Showing the last list.` : list.isFetching ? "Refreshing…" : ""}
        </p>
      </div>

      <form
        role="search"
        aria-label="Filter alarms"
        className="flex flex-wrap items-end gap-3 rounded border border-line bg-panel p-2"
        onSubmit={(e) => e.preventDefault()}
      >
        <FilterSelect
          label="Site"
          value={filter.site}
          options={sites.map((s) => ({ value: String(s.id), label: s.name }))}
          onChange={(v) => applyFilter({ ...filter, site: v ? Number(v) : undefined, compressor: undefined })}
        />
        <FilterSelect
          label="Compressor"
          value={filter.compressor}
          options={compressorOptions.map((c) => ({ value: String(c.id), label: c.name }))}
          onChange={(v) => applyFilter({ ...filter, compressor: v ? Number(v) : undefined })}
        />
        <FilterSelect
          label="Priority"
          value={filter.priority}
          options={priorities.map((p) => ({ value: p, label: priorityWords[p] }))}
          onChange={(v) => applyFilter({ ...filter, priority: (v || undefined) as Priority | undefined })}
        />
        <FilterSelect
          label="State"
          value={filter.state}
          options={listedStates.map((s) => ({ value: s, label: stateLabels[s] }))}
          onChange={(v) => applyFilter({ ...filter, state: (v || undefined) as AlarmState | undefined })}
        />
        <button type="button" className={buttonClass.secondary} onClick={() => applyFilter({})}>
          Clear filters
        </button>
      </form>

      {denied.length > 0 && (
        <ul className="space-y-0.5 text-sm text-muted" data-testid="alarm-denials">
          {denied.map((p) => (
            <li key={p}>
              {p === "alarms.acknowledge" ? "Acknowledge" : "Shelve and out of service"}: <span id={reasonIds[p]}>{denialReason(p)}</span>
            </li>
          ))}
        </ul>
      )}

      {highlightId !== null && !highlightInList && (
        <HighlightCard
          id={`${baseId}-highlight`}
          alarm={highlighted.data?.alarm ?? null}
          missing={highlighted.isError}
          now={now}
          units={units}
          role={role}
          reasonIds={reasonIds}
          onAction={onAction}
        />
      )}

      <div className="flex flex-wrap items-center gap-2" aria-label="Selected alarms" role="group">
        <span className="num text-sm text-muted">{selectedShown.length} selected</span>
        {selectionKinds.map(({ kind, alarms }) => {
          const permission = actionPermission[kind];
          const allowed = can(role, permission);
          return (
            <button
              key={kind}
              type="button"
              className={buttonClass.secondary}
              disabled={!allowed || alarms.length === 0}
              aria-describedby={allowed ? undefined : reasonIds[permission]}
              title={allowed ? undefined : denialReason(permission)}
              data-bulk-action={kind}
              onClick={() => onAction(kind, alarms)}
            >
              {actionLabel[kind]} selected{alarms.length ? ` (${alarms.length})` : ""}
            </button>
          );
        })}
      </div>

      {pending && (
        <AlarmActionPanel
          key={`${pending.kind}-${pending.alarms.map((a) => a.id).join(",")}`}
          kind={pending.kind}
          ids={pending.alarms.map((a) => a.id)}
          names={pending.alarms.map(describe)}
          onDone={onDone}
          onCancel={() => setPending(null)}
        />
      )}
      <StatusLine message={status} />
      {refusals.length > 0 && (
        <div role="alert" className="rounded border-2 border-ink bg-raised px-2 py-1.5 text-sm">
          <p className="font-semibold">Not changed:</p>
          <ul className="list-disc pl-5">
            {refusals.map((r) => (
              <li key={r.id}>
                {r.name}: {r.reason}
              </li>
            ))}
          </ul>
        </div>
      )}

      <DataTable
        caption="Alarms not back to normal, critical first, then newest"
        rows={shown}
        columns={columns}
        rowKey={(a) => a.id}
        pageSize={200}
        loading={list.isPending}
        emptyText={all.length ? "No alarm matches these filters." : "No alarms: every alarm is back to normal."}
        rowProps={(a) => ({
          "data-testid": "alarm-row",
          "data-alarm-id": a.id,
          "data-priority": a.priority,
          "data-state": a.state,
          tabIndex: a.id === highlightId ? -1 : undefined,
          "aria-current": a.id === highlightId ? "true" : undefined,
          className: a.id === highlightId ? "bg-panel outline-3 -outline-offset-3 outline-ink" : "",
        })}
      />
    </div>
  );
}

/** The alarm an e-mail linked to, when it is not on the list (back to normal, or outside the filters). */
function HighlightCard({
  id,
  alarm,
  missing,
  now,
  units,
  role,
  reasonIds,
  onAction,
}: {
  id: string;
  alarm: AlarmDto | null;
  missing: boolean;
  now: number;
  units: UnitPreference;
  role: Role;
  reasonIds: Record<Permission, string>;
  onAction: (kind: AlarmActionKind, alarms: AlarmDto[]) => void;
}) {
  return (
    <section id={id} tabIndex={-1} aria-label="Linked alarm" className="rounded border-2 border-ink bg-raised p-3" data-testid="alarm-highlight">
      {missing ? (
        <p>This alarm does not exist or is not in your sites.</p>
      ) : !alarm ? (
        <p className="text-muted">Loading the linked alarm…</p>
      ) : (
        <div className="space-y-1">
          <div className="flex flex-wrap items-center gap-2">
            <PriorityMark priority={alarm.priority} chip />
            <span className="font-semibold">{alarm.title}</span>
            <span>
              on <Link href={`/compressors/${alarm.compressorId}`}>{alarm.compressorName}</Link>, {alarm.siteName}
            </span>
          </div>
          <p className="text-sm">
            <span className="num">{valueVsLimit(alarm, units)}</span> · raised{" "}
            <span className="num">
              {formatZoned(alarm.raisedAt, alarm.timeZone)} {offsetLabel(alarm.raisedAt, alarm.timeZone)}
            </span>{" "}
            ({formatAlarmAge(now - alarm.raisedAt)} ago)
            {alarm.clearedAt && (
              <>
                {" "}
                · cleared <span className="num">{formatZoned(alarm.clearedAt, alarm.timeZone)}</span>
              </>
            )}
          </p>
          <StateCell a={alarm} />
          <ActionButtons a={alarm} role={role} reasonIds={reasonIds} onAction={onAction} />
          <p className="text-sm">
            <Link href={`/events?compressor=${alarm.compressorId}`}>Events of {alarm.compressorName}</Link>
          </p>
        </div>
      )}
    </section>
  );
}
