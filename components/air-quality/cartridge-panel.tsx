import { PriorityMark } from "@/components/alarms/priority-mark";
import type { CartridgeDto } from "@/shared/air-quality-schema";
import { SPENT_CARTRIDGE_CAUTION } from "@/shared/air-quality-alarms";
import { localDate } from "@/shared/month";

const num = (x: number, digits = 0) => x.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: digits });

/** Level word with shape and colour; nothing when the cartridge is fine (grey is normal). */
export function CartridgeLevelMark({ c }: { c: CartridgeDto }) {
  if (c.level === "warning") return <PriorityMark priority="warning" chip />;
  if (c.level === "advisory") return <PriorityMark priority="advisory" chip />;
  return null;
}

export const FREE_AIR_NOTE =
  "Free air is the model's rated delivery × running time from the 1-hour rollups (a measured delivery per fill will replace it); the air is taken as saturated at the purifier's pressure and temperature.";

export function CartridgePanel({ c, timeZone }: { c: CartridgeDto; timeZone: string }) {
  const s = c.status;
  return (
    <section aria-labelledby="cartridge-h" className="rounded border border-line bg-raised p-4" data-testid="cartridge-panel">
      <h2 id="cartridge-h" className="flex items-center gap-2 text-lg font-semibold">
        Purifier cartridge <CartridgeLevelMark c={c} />
      </h2>
      {!s ? (
        <p className="text-sm text-muted">No cartridge rating for this model or compressor: an administrator sets it on the Air quality page.</p>
      ) : (
        <>
          <dl className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
            <dt className="text-muted">Used</dt>
            <dd className="num" data-testid="cartridge-pct">{num(s.usedPct, 0)} %</dd>
            <dt className="text-muted">Water absorbed</dt>
            <dd className="num">
              {num(s.waterG, 0)} g of {num(s.capacityG, 0)} g
            </dd>
            <dt className="text-muted">100 % in</dt>
            <dd className="num">
              {s.hoursToFull == null ? "—" : `${num(s.hoursToFull, 0)} running h`}
              {s.fullAt != null && `, about ${localDate(s.fullAt, timeZone)}`}
            </dd>
            <dt className="text-muted">By hours alone</dt>
            <dd className="num">
              {num(s.hoursOnly.usedPct, 0)} % used, 100 % in {num(s.hoursOnly.hoursToFull, 0)} h
              {s.hoursOnly.fullAt != null && `, about ${localDate(s.hoursOnly.fullAt, timeZone)}`}
            </dd>
            <dt className="text-muted">Running since change</dt>
            <dd className="num">{num(s.runH, 1)} h</dd>
            <dt className="text-muted">Free air since change</dt>
            <dd className="num">{num(s.freeAirM3, 0)} m³</dd>
            <dt className="text-muted">Recent water load</dt>
            <dd className="num">{s.recentGPerRunH == null ? "—" : `${num(s.recentGPerRunH, 1)} g per running h`}</dd>
            <dt className="text-muted">Last change</dt>
            <dd className="num">{c.lastChange ? `${localDate(c.lastChange.changedAt, timeZone)}, lot ${c.lastChange.lot}` : "none logged"}</dd>
          </dl>
          <p className="mt-2 text-xs text-muted">
            {FREE_AIR_NOTE} A hot plant room shortens the cartridge: compare with the count by hours alone. Advisory at {num(c.advisoryPct)} %, warning at 100 %.
          </p>
        </>
      )}
      <p className="mt-1 text-xs text-muted">{SPENT_CARTRIDGE_CAUTION}</p>
    </section>
  );
}
