import Link from "next/link";
import { AirSettingsAdmin } from "@/components/air-quality/air-settings-admin";
import { AirTestForm } from "@/components/air-quality/air-test-form";
import { AirTestVerdict, PassFail } from "@/components/air-quality/air-test-verdict";
import { CartridgeChangeForm } from "@/components/air-quality/cartridge-change-form";
import { CartridgeLevelMark, FREE_AIR_NOTE } from "@/components/air-quality/cartridge-panel";
import { PriorityMark } from "@/components/alarms/priority-mark";
import { SafetyNotice } from "@/components/safety-notice";
import { allSiteAirSettings, DEFAULT_INTERVAL_DAYS, DEFAULT_STANDARD, listAirTests, modelRatings } from "@/db/air-quality";
import { getDb } from "@/db/client";
import { listSites } from "@/db/sites";
import { airQualityOverview } from "@/lib/air-quality/service";
import { pageUser } from "@/lib/auth/current-user";
import { airAlarmCautions, DO_NOT_USE_AIR } from "@/shared/air-quality-alarms";
import { airStandardLabels } from "@/shared/air-standards";
import { localDate } from "@/shared/month";
import { can } from "@/shared/roles";

export const dynamic = "force-dynamic";
export const metadata = { title: "Air quality" };

const pct = (x: number) => `${Math.round(x)} %`;

export default async function Page() {
  const user = await pageUser("airquality.view");
  const db = getDb();
  const now = Date.now();
  const rows = airQualityOverview(db, user.siteIds, now);
  const tests = listAirTests(db, { siteIds: user.siteIds, limit: 20 });
  const tzOf = new Map(rows.map((r) => [r.compressorId, r.timeZone]));
  const mayRecord = can(user.role, "airquality.record");
  const isAdmin = can(user.role, "admin.sites");
  const units = rows.filter((r) => r.inService).map((r) => ({ id: r.compressorId, name: r.compressorName, siteName: r.siteName, timeZone: r.timeZone, standard: r.standard }));
  const settings = allSiteAirSettings(db);
  return (
    <div className="mx-auto max-w-7xl space-y-5">
      <h1 className="text-2xl font-semibold">Air quality</h1>
      <SafetyNotice />
      <section aria-labelledby="due-h" className="space-y-2">
        <h2 id="due-h" className="text-lg font-semibold">
          Tests due and cartridges
        </h2>
        <div className="overflow-x-auto rounded border border-line bg-raised">
          <table className="w-full text-left text-sm" data-testid="air-quality-table">
            <thead className="text-xs text-muted">
              <tr>
                <th className="p-2 font-normal">Compressor</th>
                <th className="p-2 font-normal">Standard</th>
                <th className="p-2 font-normal">Last test</th>
                <th className="p-2 font-normal">Next due</th>
                <th className="p-2 font-normal">Cartridge used</th>
                <th className="p-2 font-normal">100 % about</th>
                <th className="p-2 font-normal">By hours alone</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => {
                const s = r.cartridge.status;
                return (
                  <tr key={r.compressorId} className="border-t border-line" data-testid="air-quality-row" data-compressor={r.compressorName}>
                    <td className="p-2">
                      <Link href={`/compressors/${r.compressorId}`} className="font-semibold underline">
                        {r.compressorName}
                      </Link>
                      <div className="text-xs text-muted">{r.siteName}</div>
                    </td>
                    <td className="p-2">
                      {airStandardLabels[r.standard]}
                      <div className="text-xs text-muted">every {r.intervalDays} days</div>
                    </td>
                    <td className="p-2">
                      {r.lastTest ? (
                        <>
                          <PassFail passed={r.lastTest.passed} /> <span className="num">{localDate(r.lastTest.sampledAt, r.timeZone)}</span>
                          {!r.lastTest.passed && (
                            <div className="text-xs">
                              <p className="font-semibold">{DO_NOT_USE_AIR}</p>
                              <ul className="list-disc pl-4 text-muted">
                                {airAlarmCautions("air-test-failed")
                                  .filter((c) => c !== DO_NOT_USE_AIR)
                                  .map((c) => (
                                    <li key={c}>{c}</li>
                                  ))}
                              </ul>
                            </div>
                          )}
                        </>
                      ) : (
                        <span className="text-muted">never tested</span>
                      )}
                    </td>
                    <td className="p-2">
                      <span className="num">{r.nextDueAt != null ? localDate(r.nextDueAt, r.timeZone) : "now"}</span>
                      {r.overdueDays > 0 && (
                        <div className="mt-0.5 flex items-center gap-1" data-testid="overdue">
                          <PriorityMark priority="warning" chip /> <span className="num">overdue {r.overdueDays} d</span>
                        </div>
                      )}
                    </td>
                    <td className="p-2">
                      {s ? (
                        <span className="inline-flex items-center gap-1">
                          <span className="num">{pct(s.usedPct)}</span> <CartridgeLevelMark c={r.cartridge} />
                        </span>
                      ) : (
                        <span className="text-muted">not rated</span>
                      )}
                      {s && <div className="num text-xs text-muted">{Math.round(s.waterG)} g water</div>}
                    </td>
                    <td className="num p-2">{s?.fullAt != null ? localDate(s.fullAt, r.timeZone) : "—"}</td>
                    <td className="num p-2">
                      {s ? `${pct(s.hoursOnly.usedPct)}${s.hoursOnly.fullAt != null ? `, ${localDate(s.hoursOnly.fullAt, r.timeZone)}` : ""}` : "—"}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="text-xs text-muted">{FREE_AIR_NOTE} Overdue first, then by next due date.</p>
      </section>
      {mayRecord && units.length > 0 && (
        <>
          <AirTestForm units={units} />
          <CartridgeChangeForm units={units} />
        </>
      )}
      <section aria-labelledby="records-h" className="space-y-2">
        <h2 id="records-h" className="text-lg font-semibold">
          Recent test records
        </h2>
        {tests.length === 0 && <p className="text-muted">No test recorded yet.</p>}
        {tests.map((t) => (
          <AirTestVerdict key={t.id} t={t} timeZone={tzOf.get(t.compressorId) ?? "UTC"} />
        ))}
      </section>
      {isAdmin && (
        <AirSettingsAdmin
          sites={listSites(db, null).map((s) => ({
            siteId: s.id,
            siteName: s.name,
            standard: settings.get(s.id)?.standard ?? DEFAULT_STANDARD,
            intervalDays: settings.get(s.id)?.intervalDays ?? DEFAULT_INTERVAL_DAYS,
          }))}
          models={modelRatings(db)}
        />
      )}
    </div>
  );
}
