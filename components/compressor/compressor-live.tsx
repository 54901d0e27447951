"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, type ReactNode } from "react";
import {
  classifyCondition,
  DISPLAY_RANGE_SOURCE,
  displayRanges,
  formatAge,
  formatMinutes,
  timeToStopMinutes,
  type CompressorDetail,
} from "@/shared/board";
import type { LiveMessage } from "@/shared/live";
import { FREE_AIR_BASIS } from "@/shared/air";
import { cautions } from "@/shared/safety";
import { tripCodeInfo, tripCodeLabel } from "@/shared/trip-codes";
import {
  pressureFromBar,
  pressureLabel,
  temperatureFromC,
  temperatureLabel,
  type PressureUnit,
  type TemperatureUnit,
} from "@/shared/units";
import { Band } from "../board/band";
import { ConnectionStatus } from "../board/board";
import { pressureParts, pressureShort, siteDateTime, temperatureParts, type Quantity } from "../board/format";
import { StateChip } from "../board/state-chip";
import { useServerNow } from "../live/server-clock";
import { useLive } from "../live/use-live";
import { applyLiveMessage, liveQueries, liveTokenUrl } from "../queries/live";
import { useUnits } from "../use-units";

function Reading({
  label,
  q,
  current,
  testId,
  children,
  note,
}: {
  label: string;
  q: Quantity;
  current: boolean;
  testId: string;
  children?: ReactNode;
  note?: ReactNode;
}) {
  return (
    <div className="rounded border border-line bg-raised p-3" data-testid={`${testId}-reading`}>
      <div className="flex items-baseline justify-between gap-2">
        <h3 className="text-sm font-semibold text-muted">{label}</h3>
        <span className={`num whitespace-nowrap ${current ? "text-ink" : "text-muted"}`}>
          <span className="inline-block min-w-[6ch] text-right text-2xl font-bold" data-testid={testId}>
            {q.value}
          </span>
          {q.unit && <span className="ml-1 text-sm">{q.unit}</span>}
        </span>
      </div>
      {children && <div className="mt-3 px-1">{children}</div>}
      {note && <p className="mt-1 text-xs text-muted">{note}</p>}
    </div>
  );
}

function temperatureBand(label: string, c: number | null, unit: TemperatureUnit, range: { min: number; max: number; normal: { from: number; to: number } }, current: boolean) {
  const t = (x: number) => Math.round(temperatureFromC(x, unit));
  const q = temperatureParts(c, unit);
  return (
    <Band
      label={label}
      min={t(range.min)}
      max={t(range.max)}
      value={c == null ? null : temperatureFromC(c, unit)}
      normal={{ from: t(range.normal.from), to: t(range.normal.to) }}
      fill={false}
      current={current}
      valueText={`${q.value} ${q.unit}; typical ${t(range.normal.from)} to ${t(range.normal.to)} ${temperatureLabel(unit)}`}
    />
  );
}

function pressureBand(label: string, bar: number | null, unit: PressureUnit, range: { min: number; max: number; normal: { from: number; to: number } }, current: boolean) {
  const p = (x: number) => Number(pressureShort(x, unit));
  const q = pressureParts(bar, unit);
  return (
    <Band
      label={label}
      min={p(range.min)}
      max={p(range.max)}
      value={bar == null ? null : pressureFromBar(bar, unit)}
      normal={{ from: p(range.normal.from), to: p(range.normal.to) }}
      fill={false}
      current={current}
      valueText={`${q.value} ${q.unit}; typical ${p(range.normal.from)} to ${p(range.normal.to)} ${pressureLabel(unit)}`}
    />
  );
}

function Fact({ label, value, testId, note }: { label: string; value: ReactNode; testId?: string; note?: string }) {
  return (
    <div>
      <dt className="text-xs text-muted">{label}</dt>
      <dd className="num text-lg font-semibold" data-testid={testId}>
        {value}
      </dd>
      {note && <dd className="text-xs text-muted">{note}</dd>}
    </div>
  );
}

/** The compressor page's live part: state, every reading against its range, setpoints, hour meter and starts. */
export function CompressorLive({ id }: { id: number }) {
  const client = useQueryClient();
  const units = useUnits();
  const onMessage = useCallback((msg: LiveMessage) => applyLiveMessage(client, msg), [client]);
  const live = useLive(liveTokenUrl({ kind: "user" }), onMessage);
  const detail = useQuery({ ...liveQueries.compressor(id), refetchInterval: live.status === "live" ? 5 * 60_000 : 15_000 });
  const now = useServerNow(detail.data?.at ?? 0);
  if (!detail.data) {
    return <p role="alert">{detail.error ? detail.error.message : "Loading…"}</p>;
  }
  const { compressor: c, live: v } = detail.data as CompressorDetail;
  const condition = classifyCondition(v, now);
  const { current } = condition;
  const p = units.pressureUnit;
  const tu = units.temperatureUnit;
  const delivery = pressureParts(v?.deliveryBar, p);
  const restart = pressureShort(c.restartPressureBar, p);
  const stop = pressureShort(c.stopPressureBar, p);
  const rated = pressureShort(c.ratedPressureBar, p);
  const trip = v?.runState === "tripped" ? tripCodeInfo(v.tripCode) : null;
  const toStop = current ? timeToStopMinutes(v, c.stopPressureBar, c.bankVolumeL) : null;
  const stages = Array.from({ length: c.stages }, (_, i) => i);
  const ageText = condition.freshness === "nodata" ? "No reading yet" : `Last reading ${formatAge(condition.ageMs)}`;

  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <h1 className="text-2xl font-semibold" data-testid="compressor-name">
          {c.name}
        </h1>
        <StateChip condition={condition} />
        <span className={`num text-sm ${current ? "text-muted" : "font-semibold text-ink"}`} data-testid="reading-age">
          {ageText}
          {v?.receivedAt != null && <span className="text-muted"> · {siteDateTime(v.receivedAt, c.timeZone)} site time</span>}
        </span>
        <ConnectionStatus live={live} />
      </header>
      <p className="text-sm text-muted">
        {c.siteName} · {c.modelName} · {c.stages} stages · serial <span className="num">{c.serial}</span> · device{" "}
        <span className="num">{c.deviceId}</span>
        {!c.inService && (
          <>
            {" "}
            · <strong className="text-ink">Not in service</strong>
          </>
        )}
      </p>
      {!current && condition.freshness !== "nodata" && (
        <p className="hatch-stale rounded border border-dashed border-faint bg-panel px-3 py-2 text-sm font-semibold" role="status">
          {condition.word}: the values below are the last ones received, {formatAge(condition.ageMs)}. They are not live.
        </p>
      )}
      {v?.runState === "tripped" && (
        <p className="flex items-center gap-2 rounded border-2 border-critical bg-critical-soft px-3 py-2 text-sm" role="status">
          <span aria-hidden className="shape-critical inline-block size-4 shrink-0 bg-critical" />
          <span>
            <strong>
              {current ? "Tripped" : `Last known state (${formatAge(condition.ageMs)}): tripped`}:{" "}
              {tripCodeLabel(v.tripCode) || "no trip code reported"}.
            </strong>{" "}
            {trip?.description} The machine&apos;s own protection stopped it; find the cause before restarting.
          </span>
        </p>
      )}

      <section aria-labelledby="live-values" className="space-y-3">
        <h2 id="live-values" className="text-lg font-semibold">
          Live values
        </h2>
        <div className="grid gap-3 lg:grid-cols-2">
          <Reading
            label="Delivery pressure"
            q={delivery}
            current={current}
            testId="delivery"
            note={<>Band 0 to rated {rated} {pressureLabel(p)}; R restart {restart}, S stop {stop}, as set on the machine and recorded here for display. {cautions.cylinderFill}</>}
          >
            <Band
              label="Delivery pressure"
              min={0}
              max={Number(rated)}
              value={v?.deliveryBar == null ? null : pressureFromBar(v.deliveryBar, p)}
              marks={[
                { key: "restart", label: "R", value: Number(restart) },
                { key: "stop", label: "S", value: Number(stop) },
              ]}
              current={current}
              valueText={`${delivery.value} ${delivery.unit}; restart ${restart}, stop ${stop}, rated ${rated} ${pressureLabel(p)}`}
            />
          </Reading>
          <div className="grid grid-cols-2 gap-3 rounded border border-line bg-raised p-3 sm:grid-cols-3">
            <Fact label="Time to stop pressure" value={formatMinutes(toStop)} testId="to-stop" />
            <Fact
              label="Fill rate"
              value={
                current && v?.fillRateBarPerMin != null ? `${pressureFromBar(v.fillRateBarPerMin, p).toFixed(p === "MPa" ? 3 : 1)} ${pressureLabel(p)}/min` : "—"
              }
            />
            <Fact label="Motor" value={v?.motorOn == null ? "—" : v.motorOn ? "On" : "Off"} />
            <Fact label="Hour meter" value={v?.hourMeterH == null ? "—" : `${v.hourMeterH.toFixed(1)} h`} testId="hour-meter" />
            <Fact label="Starts" value={v?.starts == null ? "—" : v.starts.toLocaleString("en-GB")} testId="starts" />
            <Fact label="Device time of reading" value={v?.ts == null ? "—" : siteDateTime(v.ts, c.timeZone).slice(11)} />
          </div>
        </div>

        <h3 className="pt-2 text-base font-semibold">Stage outlet temperatures</h3>
        <div className="grid gap-3 md:grid-cols-2 xl:grid-cols-4">
          {stages.map((i) => {
            const value = v?.stageC[i] ?? null;
            const label = i === c.stages - 1 ? `Stage ${i + 1} (final) outlet` : `Stage ${i + 1} outlet`;
            return (
              <Reading key={i} label={label} q={temperatureParts(value, tu)} current={current} testId={`stage${i + 1}-temp`}>
                {temperatureBand(label, value, tu, displayRanges.stageC, current)}
              </Reading>
            );
          })}
        </div>
        <p className="text-xs text-muted">
          {cautions.hotStage} Lighter strip: {DISPLAY_RANGE_SOURCE.toLowerCase()}
        </p>
        {v && v.stageBar.some((x) => x != null) && (
          <dl className="grid grid-cols-2 gap-3 rounded border border-line bg-raised p-3 sm:grid-cols-4">
            {stages.map((i) => {
              const q = pressureParts(v.stageBar[i] ?? null, p);
              return <Fact key={i} label={`After stage ${i + 1}`} value={`${q.value} ${q.unit}`} />;
            })}
          </dl>
        )}

        <div className="grid gap-3 md:grid-cols-3">
          <Reading label="Oil pressure" q={pressureParts(v?.oilBar, p)} current={current} testId="oil" note={cautions.oilCarryOver}>
            {pressureBand("Oil pressure", v?.oilBar ?? null, p, displayRanges.oilBar, current)}
          </Reading>
          <Reading label="Purifier temperature" q={temperatureParts(v?.purifierC, tu)} current={current} testId="purifier" note={cautions.spentCartridge}>
            {temperatureBand("Purifier temperature", v?.purifierC ?? null, tu, displayRanges.purifierC, current)}
          </Reading>
          <Reading label="Intake temperature" q={temperatureParts(v?.intakeC, tu)} current={current} testId="intake" note={cautions.intakeCo}>
            {temperatureBand("Intake temperature", v?.intakeC ?? null, tu, displayRanges.intakeC, current)}
          </Reading>
        </div>
      </section>

      <section aria-labelledby="setpoints" className="space-y-2">
        <h2 id="setpoints" className="text-lg font-semibold">
          Setpoints and ratings
        </h2>
        <dl className="grid grid-cols-2 gap-3 rounded border border-line bg-raised p-3 sm:grid-cols-5">
          <Fact label="Stop pressure" value={`${stop} ${pressureLabel(p)}`} testId="stop-setpoint" />
          <Fact label="Restart pressure" value={`${restart} ${pressureLabel(p)}`} testId="restart-setpoint" />
          <Fact label="Rated pressure" value={`${rated} ${pressureLabel(p)}`} />
          <Fact label="Rated delivery" value={`${c.ratedDeliveryLpm} l/min`} note={FREE_AIR_BASIS} />
          <Fact label="Bank volume" value={c.bankVolumeL ? `${c.bankVolumeL} l` : "none"} />
        </dl>
      </section>
    </div>
  );
}

