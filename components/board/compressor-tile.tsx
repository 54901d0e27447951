import Link from "next/link";
import { memo } from "react";
import {
  classifyCondition,
  finalStageC,
  formatAge,
  minutesParts,
  timeToStopMinutes,
  TIME_TO_STOP_LABEL,
  type BoardCompressor,
} from "@/shared/board";
import { tripCodeLabel } from "@/shared/trip-codes";
import { pressureFromBar, pressureLabel, type UnitPreference } from "@/shared/units";
import { AlarmBadges } from "../alarms/alarm-badges";
import type { AlarmCounts } from "@/shared/alarm-schema";
import { ServiceBadge } from "../service/service-badge";
import { Band } from "./band";
import { pressureParts, pressureShort, temperatureParts, type Quantity } from "./format";
import { StateChip } from "./state-chip";
import { PriorityShape } from "../alarms/priority-mark";

/** Near the end of the purifier cartridge: shape + word + number; warning at 100 %, advisory before. */
function CartridgeBadge({ usedPct }: { usedPct: number }) {
  const spent = usedPct >= 100;
  return (
    <p className="flex items-center gap-[0.35em] text-[0.8em] font-semibold text-ink" data-testid="cartridge-badge">
      <PriorityShape priority={spent ? "warning" : "advisory"} />
      {spent ? "Cartridge spent" : "Cartridge near end"} <span className="num">{Math.round(usedPct)} %</span>
    </p>
  );
}

function Figure({ label, q, current, testId }: { label: string; q: Quantity; current: boolean; testId: string }) {
  return (
    <div className="min-w-0">
      <dt className="truncate text-[0.75em] text-muted">{label}</dt>
      <dd className={`num whitespace-nowrap ${current ? "text-ink" : "text-muted"}`}>
        <span className="inline-block min-w-[4ch] text-right text-[1.35em] font-bold" data-testid={testId}>
          {q.value}
        </span>
        {q.unit && q.value !== "—" && <span className="ml-[0.25em] text-[0.8em]">{q.unit}</span>}
      </dd>
    </div>
  );
}

/** One compressor on the board: state word, delivery band, final-stage temperature, oil, time to stop, age. */
export const CompressorTile = memo(function CompressorTile({
  c,
  now,
  units,
  linkable,
  alarms,
}: {
  c: BoardCompressor;
  /** Server time, ms. */
  now: number;
  units: UnitPreference;
  linkable: boolean;
  /** Active alarms by priority; none shown when absent. */
  alarms?: AlarmCounts;
}) {
  const condition = classifyCondition(c.live, now);
  const { current, freshness } = condition;
  const live = c.live;
  const p = units.pressureUnit;
  const delivery = pressureParts(live?.deliveryBar, p);
  const toStop = current ? timeToStopMinutes(live, c.stopPressureBar, c.bankVolumeL) : null;
  const tripLabel = live?.runState === "tripped" ? tripCodeLabel(live.tripCode) : "";
  const restart = pressureShort(c.restartPressureBar, p);
  const stop = pressureShort(c.stopPressureBar, p);
  const rated = pressureShort(c.ratedPressureBar, p);
  const titleId = `tile-${c.id}-name`;
  const ageText =
    freshness === "nodata" ? "No reading yet" : current ? formatAge(condition.ageMs) : `Last reading ${formatAge(condition.ageMs)}`;

  return (
    <article
      aria-labelledby={titleId}
      data-testid="compressor-tile"
      data-compressor-id={c.id}
      data-state={condition.word}
      data-freshness={freshness}
      className={`flex flex-col gap-[0.55em] rounded-[0.3em] border p-[0.75em] ${
        current ? "border-line bg-raised" : "hatch-stale border-dashed border-faint bg-panel"
      } ${condition.word === "Tripped" ? "border-critical ring-[0.12em] ring-critical" : ""}`}
    >
      <header className="flex items-start justify-between gap-[0.5em]">
        {/* The name keeps at least half the width, so badges never squeeze it away. */}
        <div className="min-w-[50%] flex-1">
          <h3 id={titleId} className="truncate text-[1.15em] font-semibold leading-tight">
            {linkable ? (
              <Link href={`/compressors/${c.id}`} className="text-ink no-underline hover:underline">
                {c.name}
              </Link>
            ) : (
              c.name
            )}
          </h3>
          {/* One line either way, so a trip does not move anything on the board. */}
          {tripLabel && current ? (
            <p className="truncate text-[0.75em] font-semibold text-ink" data-testid="trip-label">
              {tripLabel}
            </p>
          ) : (
            <p className="truncate text-[0.75em] text-muted">
              {c.modelName} · {c.stages} stages{!c.inService && <> · <strong className="text-ink">Not in service</strong></>}
            </p>
          )}
        </div>
        <div className="flex h-[1.6em] min-w-[1.6em] shrink items-center justify-end gap-[0.25em] overflow-hidden" data-testid="alarm-slot">
          <ServiceBadge badge={c.service} label={c.name} href={linkable ? `/service?compressor=${c.id}` : undefined} />
          <AlarmBadges counts={alarms} label={c.name} href={linkable ? `/alarms?compressor=${c.id}` : undefined} />
        </div>
      </header>
      {c.cartridge && c.cartridge.usedPct >= c.cartridge.advisoryPct && <CartridgeBadge usedPct={c.cartridge.usedPct} />}

      <div className="flex items-center gap-[0.5em]">
        <StateChip condition={condition} tripLabel={tripLabel || undefined} />
        <span className={`num ml-auto shrink-0 text-[0.8em] ${current ? "text-muted" : "font-semibold text-ink"}`} data-testid="reading-age">
          {ageText}
        </span>
      </div>

      <div>
        <div className="flex items-baseline justify-between gap-[0.5em]">
          <span className="text-[0.8em] text-muted">Delivery</span>
          <span className={`num whitespace-nowrap ${current ? "text-ink" : "text-muted"}`}>
            <span className="inline-block min-w-[6ch] text-right text-[2.2em] font-bold leading-none" data-testid="delivery-value">
              {delivery.value}
            </span>
            <span className={`ml-[0.25em] text-[0.9em] ${delivery.value === "—" ? "invisible" : ""}`}>{delivery.unit}</span>
          </span>
        </div>
        <div className="mt-[0.35em] px-[0.2em]">
          <Band
            label={`${c.name} delivery pressure`}
            min={0}
            max={Number(rated)}
            minLabel="0"
            maxLabel={rated}
            value={live?.deliveryBar == null ? null : pressureFromBar(live.deliveryBar, p)}
            marks={[
              { key: "restart", label: "R", value: Number(restart) },
              { key: "stop", label: "S", value: Number(stop) },
            ]}
            current={current}
            valueText={`${delivery.value} ${delivery.unit}${current ? "" : ` (${condition.word.toLowerCase()}, ${ageText.toLowerCase()})`}; restart ${restart}, stop ${stop}, rated ${rated} ${pressureLabel(p)}`}
            testId="delivery-band"
          />
          <p className="num mt-[0.2em] truncate text-[0.7em] text-muted">
            R restart {restart} · S stop {stop} {pressureLabel(p)}
          </p>
        </div>
      </div>

      <dl className="grid grid-cols-3 gap-[0.5em]">
        <Figure label="Final stage" q={temperatureParts(finalStageC(live, c.stages), units.temperatureUnit)} current={current} testId="final-stage-value" />
        <Figure label="Oil" q={pressureParts(live?.oilBar, p)} current={current} testId="oil-value" />
        <Figure label={TIME_TO_STOP_LABEL} q={minutesParts(toStop)} current={current} testId="to-stop-value" />
      </dl>
    </article>
  );
});
