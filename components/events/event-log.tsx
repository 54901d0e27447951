"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { useId, useState } from "react";
import { priorities, type Priority } from "@/shared/alarm-rules";
import { buttonClass } from "../admin/form-kit";
import { PriorityMark, priorityWords } from "../alarms/priority-mark";
import { eventQueries, eventsCsvUrl } from "../queries/events";
import { eventKindLabel, eventKinds, eventKindLabels, type EventKind } from "@/shared/event-kinds";
import {
  effectiveZone,
  eventFilterQuery,
  zoneChoices,
  type EventCursorParam,
  type EventFilterParams,
  type ZoneSite,
} from "@/shared/event-schema";
import { formatZoned, isoWithOffset, offsetLabel } from "@/shared/zoned-time";
import { FilterSelect } from "@/components/filter-select";

export type EventCompressorOption = { id: number; name: string; siteId: number };

type Draft = { q: string; from: string; to: string };

const draftOf = (f: EventFilterParams): Draft => ({ q: f.q ?? "", from: f.from ?? "", to: f.to ?? "" });

function parseCursor(s: string | null): EventCursorParam | null {
  if (!s) return null;
  const [ts, id] = s.split(".").map(Number);
  return ts !== undefined && id !== undefined && Number.isFinite(ts) && Number.isFinite(id) ? { ts, id } : null;
}

/**
 * The event log: full-text search with filters, newest first, paged by keyset (Newer / Older), times entered and
 * shown in one zone (the chosen site's, or the person's choice among their sites'), and a CSV of the same filters.
 */
export function EventLog({
  sites,
  compressors,
  initial,
  showsSiteless,
}: {
  sites: ZoneSite[];
  compressors: EventCompressorOption[];
  initial: EventFilterParams;
  /** Whether this person sees events of no site (sign-ins, accounts): administrators only. */
  showsSiteless: boolean;
}) {
  const pathname = usePathname();
  const ids = useId();
  const [applied, setApplied] = useState<EventFilterParams>(initial);
  const [draft, setDraft] = useState<Draft>(draftOf(initial));
  // Keyset positions of the pages visited: [null] is the newest page.
  const [stack, setStack] = useState<(EventCursorParam | null)[]>([null]);
  const [openedAt] = useState(() => Date.now());
  const after = stack[stack.length - 1] ?? null;
  const page = useQuery(eventQueries.page(applied, after));

  const zone = effectiveZone(applied, sites);
  const zones = zoneChoices(sites);
  const compressorOptions = compressors.filter((c) => applied.site === undefined || c.siteId === applied.site);

  function apply(next: EventFilterParams) {
    const clean = Object.fromEntries(Object.entries(next).filter(([, v]) => v !== undefined && v !== "")) as EventFilterParams;
    setApplied(clean);
    setStack([null]);
    const q = eventFilterQuery(clean);
    window.history.replaceState(null, "", `${pathname}${q ? `?${q}` : ""}`);
  }

  function submit(e: React.FormEvent) {
    e.preventDefault();
    apply({ ...applied, q: draft.q.trim() || undefined, from: draft.from || undefined, to: draft.to || undefined });
  }

  function reset() {
    setDraft({ q: "", from: "", to: "" });
    apply({});
  }

  const data = page.data;
  const events = data?.events ?? [];
  const next = parseCursor(data?.next ?? null);
  const position = stack.length - 1;
  const field = "mt-0.5 rounded border border-line bg-white px-2 py-1 text-sm text-ink";
  const label = "block text-xs font-semibold text-muted";

  return (
    <div className="space-y-3" data-testid="event-log">
      <h1 className="text-2xl font-semibold">Events</h1>

      <form role="search" aria-label="Search the event log" onSubmit={submit} className="space-y-2 rounded border border-line bg-panel p-2">
        <div className="flex flex-wrap items-end gap-3">
          <div className="min-w-64 flex-1">
            <label htmlFor={`${ids}-q`} className={label}>
              Words
            </label>
            <input
              id={`${ids}-q`}
              type="search"
              name="q"
              value={draft.q}
              onChange={(e) => setDraft({ ...draft, q: e.target.value })}
              placeholder="e.g. oil pressure, TA-3, a person’s e-mail"
              aria-describedby={`${ids}-q-hint`}
              className={`${field} w-full`}
              maxLength={200}
            />
            <p id={`${ids}-q-hint`} className="text-xs text-muted">
              Every word must appear; the last may be the start of a word.
            </p>
          </div>
          <button type="submit" className={buttonClass.primary}>
            Search
          </button>
          <button type="button" className={buttonClass.secondary} onClick={reset}>
            Clear
          </button>
        </div>
        <div className="flex flex-wrap items-end gap-3">
          <FilterSelect
            label="Site"
            value={applied.site}
            options={sites.map((s) => ({ value: String(s.id), label: s.name }))}
            onChange={(v) => apply({ ...applied, site: v ? Number(v) : undefined, compressor: undefined })}
          />
          <FilterSelect
            label="Compressor"
            value={applied.compressor}
            options={compressorOptions.map((c) => ({ value: String(c.id), label: c.name }))}
            onChange={(v) => apply({ ...applied, compressor: v ? Number(v) : undefined })}
          />
          <FilterSelect
            label="Priority"
            value={applied.priority}
            options={priorities.map((p) => ({ value: p, label: priorityWords[p] }))}
            onChange={(v) => apply({ ...applied, priority: (v || undefined) as Priority | undefined })}
          />
          <FilterSelect
            label="Kind"
            value={applied.kind}
            options={eventKinds.map((k) => ({ value: k, label: eventKindLabels[k] }))}
            onChange={(v) => apply({ ...applied, kind: (v || undefined) as EventKind | undefined })}
          />
          <div>
            <label htmlFor={`${ids}-from`} className={label}>
              From
            </label>
            <input
              id={`${ids}-from`}
              type="datetime-local"
              value={draft.from}
              onChange={(e) => setDraft({ ...draft, from: e.target.value })}
              aria-describedby={`${ids}-zone-note`}
              className={`${field} num`}
            />
          </div>
          <div>
            <label htmlFor={`${ids}-to`} className={label}>
              Until (not including)
            </label>
            <input
              id={`${ids}-to`}
              type="datetime-local"
              value={draft.to}
              onChange={(e) => setDraft({ ...draft, to: e.target.value })}
              aria-describedby={`${ids}-zone-note`}
              className={`${field} num`}
            />
          </div>
          {applied.site === undefined && zones.length > 1 ? (
            <div>
              <label htmlFor={`${ids}-tz`} className={label}>
                Times in
              </label>
              <select
                id={`${ids}-tz`}
                value={zone}
                onChange={(e) => apply({ ...applied, tz: e.target.value })}
                className={field}
              >
                {zones.map((z) => (
                  <option key={z.timeZone} value={z.timeZone}>
                    {z.label}
                  </option>
                ))}
              </select>
            </div>
          ) : null}
        </div>
        <p id={`${ids}-zone-note`} className="text-xs text-muted" data-testid="event-zone">
          Times are entered and shown in <strong className="text-ink">{zone}</strong>
          {applied.site !== undefined ? " (the site’s time zone)" : ""}, currently{" "}
          <span className="num">{offsetLabel(openedAt, zone)}</span>. Press Search to apply words and times.
        </p>
      </form>

      <div className="flex flex-wrap items-center gap-3">
        <p role="status" className="num text-sm text-muted" data-testid="event-status">
          {page.isPending
            ? "Searching…"
            : page.isError
              ? ""
              : `Page ${position + 1}: ${events.length === 0 ? "no events" : `${events.length} event${events.length === 1 ? "" : "s"}`}${page.isFetching ? " (updating…)" : ""}`}
        </p>
        <a href={eventsCsvUrl(applied)} download className={`${buttonClass.secondary} no-underline`} data-testid="event-csv">
          Download CSV
        </a>
        {!showsSiteless && <p className="text-xs text-muted">Sign-ins and account changes are shown to administrators only.</p>}
      </div>

      {page.isError && (
        <p role="alert" className="rounded border-2 border-ink bg-raised px-2 py-1.5 text-sm font-semibold">
          {page.error.message}
        </p>
      )}

      <div className="overflow-x-auto rounded border border-line bg-raised">
        <table className="w-full border-collapse text-sm" aria-busy={page.isFetching || undefined} data-testid="event-table">
          <caption className="sr-only">Events, newest first, times in {zone}</caption>
          <thead className="bg-panel">
            <tr>
              {["Time", "Priority", "Kind", "Site", "Compressor", "Event", "By"].map((h) => (
                <th key={h} scope="col" className="border-b border-line px-2 py-1.5 text-left font-semibold whitespace-nowrap">
                  {h === "Time" ? (
                    <>
                      Time <span className="text-xs font-normal text-muted">({zone})</span>
                    </>
                  ) : (
                    h
                  )}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {events.length === 0 ? (
              <tr>
                <td colSpan={7} className="px-2 py-3 text-muted">
                  {page.isPending ? "Searching…" : "No events match."}
                </td>
              </tr>
            ) : (
              events.map((e) => (
                <tr key={e.id} className="border-t border-line align-top first:border-t-0" data-testid="event-row" data-event-id={e.id}>
                  <td className="num px-2 py-1 whitespace-nowrap" title={isoWithOffset(e.ts, zone)}>
                    {formatZoned(e.ts, zone)}
                  </td>
                  <td className="px-2 py-1 whitespace-nowrap">{e.priority ? <PriorityMark priority={e.priority} /> : <span className="text-muted">—</span>}</td>
                  <td className="px-2 py-1 whitespace-nowrap">{eventKindLabel(e.kind)}</td>
                  <td className="px-2 py-1">{e.siteName ?? <span className="text-muted">—</span>}</td>
                  <td className="px-2 py-1 whitespace-nowrap">
                    {e.compressorId !== null ? (
                      <Link href={`/compressors/${e.compressorId}?at=${e.ts}`} title="The compressor at the time of this event">
                        {e.compressorName ?? `Compressor ${e.compressorId}`}
                      </Link>
                    ) : (
                      <span className="text-muted">—</span>
                    )}
                  </td>
                  <td className="px-2 py-1">
                    {e.text}
                    {e.alarmId !== null && (
                      <>
                        {" "}
                        <Link href={`/alarms?id=${e.alarmId}`} className="text-xs whitespace-nowrap">
                          the alarm
                        </Link>
                      </>
                    )}
                  </td>
                  <td className="px-2 py-1 text-muted">{e.actor || "—"}</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>

      <nav aria-label="Event pages" className="flex flex-wrap items-center gap-2 text-sm">
        <button type="button" className={buttonClass.secondary} disabled={position === 0} onClick={() => setStack([null])}>
          Newest
        </button>
        <button type="button" className={buttonClass.secondary} disabled={position === 0} onClick={() => setStack((s) => s.slice(0, -1))}>
          ‹ Newer
        </button>
        <button
          type="button"
          className={buttonClass.secondary}
          disabled={!next || page.isFetching}
          onClick={() => next && setStack((s) => [...s, next])}
        >
          {data?.partial ? "Search older ›" : "Older ›"}
        </button>
        {data?.partial && next && (
          <span className="text-muted" data-testid="event-partial">
            Searched back to <span className="num">{formatZoned(next.ts, zone)}</span>; older matches may exist.
          </span>
        )}
      </nav>
    </div>
  );
}
