"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useEffect, useRef, useState, type RefObject } from "react";
import { classifyCondition, stateWords, type BoardData, type BoardSite, type StateWord } from "@/shared/board";
import type { LiveMessage } from "@/shared/live";
import type { Theme } from "@/shared/palette";
import type { UnitPreference } from "@/shared/units";
import { useServerNow } from "../live/server-clock";
import { liveStatusText, useLive, type LiveState } from "../live/use-live";
import type { AlarmCounts } from "@/shared/alarm-schema";
import { alarmQueries } from "../queries/alarms";
import { applyLiveMessage, HttpError, liveQueries, liveTokenUrl, type BoardSource } from "../queries/live";
import { useUnits } from "../use-units";
import { CompressorTile } from "./compressor-tile";
import { DisplayRevoked } from "./display-revoked";
import { siteClock } from "./format";
import { useFitFont } from "./use-fit-font";
import { useWakeLock } from "./use-wake-lock";
import { SafetyNotice } from "../safety-notice";

/** Board text scales with the viewport so the same layout reads across a room at 1080p and at 4K. */
const BOARD_FONT = "clamp(13px, 0.95vw, 46px)";
const TILE_EM = 17;
const GAP_EM = 0.75;

export function ConnectionStatus({ live }: { live: LiveState }) {
  const ok = live.status === "live";
  return (
    <span
      role="status"
      aria-live="polite"
      data-testid="live-status"
      data-status={live.status}
      className={`inline-flex items-center gap-[0.4em] rounded-[0.2em] border px-[0.6em] py-[0.15em] text-[0.9em] font-semibold ${
        ok ? "border-line bg-raised text-ink" : "hatch-stale border-dashed border-faint bg-panel text-ink"
      }`}
    >
      <span aria-hidden className={`inline-block size-[0.6em] rounded-full border border-ink ${ok ? "bg-ink" : "bg-transparent"}`} />
      {liveStatusText[live.status]}
    </span>
  );
}

function SiteClock({ now, timeZone }: { now: number; timeZone: string }) {
  const { time, zone } = siteClock(now, timeZone);
  return (
    <span className="num whitespace-nowrap text-[0.95em] text-ink" data-testid="site-clock">
      <span className="sr-only">Local time </span>
      <span className="inline-block min-w-[8ch]">{time}</span> <span className="text-[0.8em] text-muted">{zone}</span>
    </span>
  );
}

function Summary({ data, now }: { data: BoardData; now: number }) {
  const counts = new Map<StateWord, number>();
  for (const c of data.compressors) {
    const w = classifyCondition(c.live, now).word;
    counts.set(w, (counts.get(w) ?? 0) + 1);
  }
  const parts = stateWords.filter((w) => counts.get(w)).map((w) => `${counts.get(w)} ${w.toLowerCase()}`);
  return (
    <p className="num text-[0.9em] text-muted" data-testid="board-summary">
      {data.compressors.length} compressors{parts.length ? ` · ${parts.join(" · ")}` : ""}
    </p>
  );
}

function SiteSection({
  site,
  data,
  now,
  units,
  linkable,
  alarmCounts,
}: {
  site: BoardSite;
  data: BoardData;
  now: number;
  units: UnitPreference;
  linkable: boolean;
  alarmCounts: Record<string, AlarmCounts> | undefined;
}) {
  const compressors = data.compressors.filter((c) => c.siteId === site.id);
  const headingId = `site-${site.id}-name`;
  const n = Math.max(1, compressors.length);
  // Sites sit side by side when they fit, each as wide as its tiles, so a whole fleet fits one wall screen.
  const basis = `min(100%, calc(${n} * ${TILE_EM}em + ${n - 1} * ${GAP_EM}em))`;
  return (
    <section
      aria-labelledby={headingId}
      data-testid="board-site"
      data-site-code={site.code}
      className="min-w-0"
      style={{ flex: `${n} 1 ${basis}` }}
    >
      <header className="mb-[0.5em] flex flex-wrap items-baseline gap-x-[1em] border-b border-line pb-[0.25em]">
        <h2 id={headingId} className="text-[1.3em] font-semibold">
          {site.name}
        </h2>
        <SiteClock now={now} timeZone={site.timeZone} />
        <span className="text-[0.8em] text-muted">{site.timeZone}</span>
      </header>
      {compressors.length ? (
        <div className="grid" style={{ gap: `${GAP_EM}em`, gridTemplateColumns: `repeat(auto-fill, minmax(min(100%, ${TILE_EM}em), 1fr))` }}>
          {compressors.map((c) => (
            <CompressorTile key={c.id} c={c} now={now} units={units} linkable={linkable} alarms={alarmCounts?.[c.id]} />
          ))}
        </div>
      ) : (
        <p className="text-muted">No compressors at this site.</p>
      )}
    </section>
  );
}

/**
 * The board: every site in scope with its local time, every compressor as a tile. Values come prefetched from the
 * server, then the live socket keeps them current; a stale or offline compressor is shown as such.
 */
export function Board({ source, title, theme: linkTheme }: { source: BoardSource; title: string; theme?: Theme }) {
  const client = useQueryClient();
  const rootRef = useRef<HTMLDivElement>(null);
  const fitRef = useRef<HTMLDivElement>(null);
  const fullscreen = useFullscreen(rootRef);
  const [chosenTheme, setTheme] = useBoardTheme(linkTheme);
  const units = useUnits();
  const onMessage = useCallback((msg: LiveMessage) => applyLiveMessage(client, msg), [client]);
  const [revoked, setRevoked] = useState(false);
  const live = useLive(liveTokenUrl(source), onMessage, !revoked);
  const board = useQuery({
    ...liveQueries.board(source),
    // The socket carries values; polling only picks up configuration, or stands in while the socket is down.
    // A wall screen polls a little more often so that a revoked link shows as revoked within a minute.
    refetchInterval: revoked ? false : live.status !== "live" ? 15_000 : source.kind === "display" ? 60_000 : 5 * 60_000,
  });
  const now = useServerNow(board.data?.at ?? 0);
  const kiosk = source.kind === "display";
  const alarmCounts = useQuery({
    ...(source.kind === "display" ? alarmQueries.displayCounts(source.token) : alarmQueries.counts()),
    enabled: !revoked,
  });

  const refusedStatus = board.error instanceof HttpError ? board.error.status : live.status === "refused" ? live.refusal : null;
  const linkGone = kiosk && (refusedStatus === 410 || refusedStatus === 404);
  // A revoked wall screen drops its socket and stops polling: it shows the revoked page and nothing else.
  if (linkGone && !revoked) setRevoked(true);
  // On a wall (the kiosk, or the board in full screen) everything fits one screen, stays awake and shows the notice.
  const wall = kiosk || fullscreen.active;
  const wakeLock = useWakeLock(wall);
  const fitted = useFitFont(fitRef, wall && !linkGone && !revoked, `${board.data?.compressors.length ?? 0}:${board.data?.sites.length ?? 0}`, '[data-testid="compressor-tile"]');
  if (linkGone || revoked) return <DisplayRevoked />;

  return (
    <div
      ref={rootRef}
      data-theme={chosenTheme}
      data-testid="board-root"
      data-wall={wall || undefined}
      data-wake-lock={wall ? wakeLock : undefined}
      className={wall ? "flex h-dvh flex-col bg-canvas text-ink" : "bg-canvas text-ink"}
    >
      <div
        ref={fitRef}
        style={{ fontSize: wall ? (fitted === null ? BOARD_FONT : `${fitted}px`) : BOARD_FONT }}
        className={wall ? "min-h-0 flex-1 space-y-[1em] overflow-hidden px-[1.2vw] py-[1vw]" : "space-y-[1em]"}
        data-testid="board"
        data-font-px={fitted ?? undefined}
      >
        <div className="flex flex-wrap items-center gap-x-[1em] gap-y-[0.3em]">
          <h1 className="text-[1.5em] font-semibold">{title}</h1>
          <ConnectionStatus live={live} />
          {board.data && <Summary data={board.data} now={now} />}
          <div className="no-print ml-auto flex items-center gap-[0.5em]">
            {!linkTheme && (
              <button type="button" className={toolClass} onClick={() => setTheme(chosenTheme === "dark" ? "light" : "dark")} data-testid="board-theme">
                {chosenTheme === "dark" ? "Light theme" : "Dark theme"}
              </button>
            )}
            {fullscreen.supported && (
              <button type="button" className={toolClass} onClick={fullscreen.toggle} data-testid="board-fullscreen">
                {fullscreen.active ? "Leave full screen" : "Full screen"}
              </button>
            )}
          </div>
        </div>
        {live.status === "refused" && !kiosk && (
          <p role="alert" className="text-ink">
            Live values are not available to this account. Values shown are from the last page load.
          </p>
        )}
        {board.error && !board.data && (
          <p role="alert" className="text-ink">
            The board could not be loaded: {board.error.message}
          </p>
        )}
        {board.data && board.data.sites.length === 0 && <p className="text-muted">No sites to show.</p>}
        <div className="flex flex-wrap gap-x-[1.5em] gap-y-[1em]">
          {board.data?.sites.map((site) => (
            <SiteSection
              key={site.id}
              site={site}
              data={board.data}
              now={now}
              units={units}
              linkable={!kiosk}
              alarmCounts={alarmCounts.data?.counts}
            />
          ))}
        </div>
      </div>
      {wall && <SafetyNotice compact />}
    </div>
  );
}

const toolClass = "rounded-[0.2em] border border-line bg-raised px-[0.6em] py-[0.15em] text-[0.8em] text-ink hover:bg-panel";

/** The board's own theme on a signed-in screen: remembered in this browser; a display link's theme is fixed. */
function useBoardTheme(fixed: Theme | undefined): [Theme, (t: Theme) => void] {
  const [chosen, setChosen] = useState<Theme>("light");
  useEffect(() => {
    if (fixed) return;
    const saved = window.localStorage.getItem(THEME_KEY);
    // Browser-only value, read after hydration so the server's HTML and the first client render agree.
    // eslint-disable-next-line react-hooks/set-state-in-effect
    if (saved === "dark" || saved === "light") setChosen(saved);
  }, [fixed]);
  const set = useCallback((t: Theme) => {
    setChosen(t);
    window.localStorage.setItem(THEME_KEY, t);
  }, []);
  return [fixed ?? chosen, set];
}
const THEME_KEY = "airkeep.board-theme";

/** Full screen for the board element (Fullscreen API), so a supervisor's browser becomes a wall screen. */
function useFullscreen(ref: RefObject<HTMLElement | null>) {
  const [active, setActive] = useState(false);
  const [supported, setSupported] = useState(false);
  useEffect(() => {
    // Browser-only value, read after hydration so the server's HTML and the first client render agree.
    // eslint-disable-next-line react-hooks/set-state-in-effect
    setSupported(document.fullscreenEnabled === true);
    const onChange = () => setActive(document.fullscreenElement !== null && document.fullscreenElement === ref.current);
    document.addEventListener("fullscreenchange", onChange);
    return () => document.removeEventListener("fullscreenchange", onChange);
  }, [ref]);
  const toggle = useCallback(() => {
    if (document.fullscreenElement) void document.exitFullscreen();
    else void ref.current?.requestFullscreen();
  }, [ref]);
  return { active, supported, toggle };
}
