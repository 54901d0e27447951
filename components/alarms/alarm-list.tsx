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
import { cautionsFor } from "@/shared/notify-text";
import { AlarmActionPanel } from "./alarm-action-panel";
import { AlarmMiniTrend } from "./alarm-mini-trend";
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
  const highlightInList = highlightId !== null && (list.data?.alarms ?? []).some((a) => a.id === highlightId);
  const highlighted = useQuery({ ...alarmQueries.one(highlightId ?? 0), enabled: highlightId !== null && list.isSuccess && !highlightInList });
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
  const focused = useRef<number | null>(null);
  useEffect(() => {
    if (focused.current === highlightId || highlightId === null || !list.data) return;
    const target = document.getElementById(`${baseId}-highlight`);
    if (target) {
      focused.current = highlightId;
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

  // The panel opens under the linked alarm when it acts on that one alarm, so a phone needs no scrolling.
  const pendingOnDetail = pending !== null && pending.alarms.length === 1 && pending.alarms[0]!.id === highlightId;
  const panel = pending && (
    <AlarmActionPanel
      key={`${pending.kind}-${pending.alarms.map((a) => a.id).join(",")}`}
      kind={pending.kind}
      ids={pending.alarms.map((a) => a.id)}
      names={pending.alarms.map(describe)}
      onDone={onDone}
      onCancel={() => setPending(null)}
    />
  );

  const counts = priorities.map((p) => ({ p, n: shown.filter((a) => a.priority === p).length })).filter((x) => x.n > 0);
  const compressorOptions = compressors.filter((c) => filter.site === undefined || c.siteId === filter.site);
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

      {highlightId !== null && (
        <AlarmDetail
          id={`${baseId}-highlight`}
          alarm={all.find((a) => a.id === highlightId) ?? highlighted.data?.alarm ?? null}
          missing={!highlightInList && highlighted.isError}
          now={now}
          units={units}
          role={role}
          reasonIds={reasonIds}
          onAction={onAction}
        />
      )}
      {pending && pendingOnDetail && panel}
      {pendingOnDetail && <StatusLine message={status} />}

      <div className="hidden flex-wrap items-center gap-2 sm:flex" aria-label="Selected alarms" role="group">
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

      {pending && !pendingOnDetail && panel}
      {!pendingOnDetail && <StatusLine message={status} />}
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

      <AlarmCards alarms={shown} now={now} units={units} highlightId={highlightId} loading={list.isPending} emptyText={all.length ? "No alarm matches these filters." : "No alarms: every alarm is back to normal."} />
      <div className="hidden sm:block">
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
    </div>
  );
}

/** Below 640 px the list is a column of cards; a tap opens the alarm at the top of the page with its actions. */
function AlarmCards({
  alarms,
  now,
  units,
  highlightId,
  loading,
  emptyText,
}: {
  alarms: AlarmDto[];
  now: number;
  units: UnitPreference;
  highlightId: number | null;
  loading: boolean;
  emptyText: string;
}) {
  if (loading) return <p className="text-muted sm:hidden">Loading alarms…</p>;
  if (!alarms.length) return <p className="text-muted sm:hidden">{emptyText}</p>;
  return (
    <ul className="space-y-2 sm:hidden" aria-label="Alarms not back to normal, critical first, then newest">
      {alarms.map((a) => (
        <li key={a.id}>
          <Link
            href={`/alarms?id=${a.id}`}
            data-testid="alarm-card"
            data-alarm-id={a.id}
            data-state={a.state}
            aria-current={a.id === highlightId ? "true" : undefined}
            className={`block rounded border bg-raised p-2 text-ink no-underline ${a.id === highlightId ? "border-2 border-ink" : "border-line"}`}
          >
            <div className="flex items-center justify-between gap-2">
              <PriorityMark priority={a.priority} chip />
              <span className="num text-sm font-semibold">{formatAlarmAge(now - a.raisedAt)}</span>
            </div>
            <p className="mt-1 font-semibold">{a.title}</p>
            <p className="text-sm">
              {a.compressorName} · <span className="text-muted">{a.siteName}</span>
            </p>
            {valueVsLimit(a, units) && <p className="num text-sm">{valueVsLimit(a, units)}</p>}
            <p className="text-sm">{stateLabels[a.state]}</p>
          </Link>
        </li>
      ))}
    </ul>
  );
}

/**
 * The alarm an e-mail linked to, at the top of the page: what, where, how far past its limit, how long, the cautions
 * that fit it and the hour around it, with its actions one tap away (large on a phone).
 */
function AlarmDetail({
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
  const cautionList = alarm ? cautionsFor(alarm) : [];
  return (
    <section id={id} tabIndex={-1} aria-label="Linked alarm" className="space-y-2 rounded border-2 border-ink bg-raised p-3" data-testid="alarm-highlight">
      {missing ? (
        <p>This alarm does not exist or is not in your sites.</p>
      ) : !alarm ? (
        <p className="text-muted">Loading the linked alarm…</p>
      ) : (
        <>
          <div className="flex flex-wrap items-center gap-2">
            <PriorityMark priority={alarm.priority} chip />
            <h2 className="text-lg font-semibold">{alarm.title}</h2>
          </div>
          <p>
            <Link href={`/compressors/${alarm.compressorId}`} className="font-medium">
              {alarm.compressorName}
            </Link>
            , {alarm.siteName}
          </p>
          <p className="text-sm">
            <span className="num">{valueVsLimit(alarm, units)}</span> · raised{" "}
            <span className="num">
              {formatZoned(alarm.raisedAt, alarm.timeZone)} {offsetLabel(alarm.raisedAt, alarm.timeZone)}
            </span>{" "}
            (<span className="num" data-testid="alarm-detail-age">{formatAlarmAge(now - alarm.raisedAt)}</span> ago)
            {alarm.clearedAt && (
              <>
                {" "}
                · cleared <span className="num">{formatZoned(alarm.clearedAt, alarm.timeZone)}</span>
              </>
            )}
          </p>
          <StateCell a={alarm} />
          <div className="[&_button]:min-h-11 [&_button]:px-4 [&_button]:text-base sm:[&_button]:min-h-0 sm:[&_button]:px-2 sm:[&_button]:text-xs" data-testid="alarm-detail-actions">
            <ActionButtons a={alarm} role={role} reasonIds={reasonIds} onAction={onAction} />
          </div>
          {cautionList.length > 0 && (
            <ul className="space-y-1 border-l-4 border-ink pl-3 text-sm" data-testid="alarm-cautions" aria-label="Cautions">
              {cautionList.map((c) => (
                <li key={c}>{c}</li>
              ))}
            </ul>
          )}
          <AlarmMiniTrend alarm={alarm} />
          <p className="text-sm">
            <Link href={`/events?compressor=${alarm.compressorId}`}>Events of {alarm.compressorName}</Link>
          </p>
        </>
      )}
    </section>
  );
}
