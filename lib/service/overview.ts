import type { Db } from "@/db/client";
import { effectivePlans, getServiceLead, listServiceLog, listServiceWindows, modelPlan, serviceDueList } from "@/db/service";
import { listModels } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { compressors } from "@/db/schema";
import type { ServiceOverviewDto } from "@/shared/service-schema";

const DAY = 86_400_000;

/** Everything /service shows, limited to the person's sites and the filters. */
export function serviceOverview(
  db: Db,
  siteIds: number[] | null,
  f: { site?: number; compressor?: number; q?: string; limit?: number },
  now = Date.now(),
): ServiceOverviewDto {
  const sites = listSites(db, siteIds).map((s) => ({ id: s.id, name: s.name, timeZone: s.timeZone }));
  const tz = new Map(sites.map((s) => [s.id, s.timeZone]));
  const plans = effectivePlans(db);
  const units = db
    .select({ id: compressors.id, name: compressors.name, siteId: compressors.siteId })
    .from(compressors)
    .all()
    .filter((c) => tz.has(c.siteId))
    .sort((a, b) => a.name.localeCompare(b.name))
    .map((c) => ({ ...c, timeZone: tz.get(c.siteId)!, tasks: (plans.get(c.id) ?? []).map((t) => ({ code: t.code, name: t.name })) }));
  const keep = (x: { siteId: number; compressorId: number }) => (!f.site || x.siteId === f.site) && (!f.compressor || x.compressorId === f.compressor);
  return {
    at: now,
    sites,
    compressors: units,
    due: serviceDueList(db, now, siteIds).filter(keep),
    log: listServiceLog(db, { siteIds, site: f.site, compressor: f.compressor, q: f.q, limit: f.limit ?? 50 }),
    windows: listServiceWindows(db, { siteIds, compressor: f.compressor, since: now - 30 * DAY, limit: 50 }).filter(keep),
    lead: getServiceLead(db),
    plans: {
      // A model's plan reaches every site: shown only to people who see every site.
      models: siteIds === null ? listModels(db).map((m) => ({ id: m.id, name: m.name, tasks: modelPlan(db, m.id) })) : [],
      compressors: Object.fromEntries(
        [...effectivePlans(db, { includeDisabled: true, compressorIds: units.map((u) => u.id) })].map(([id, tasks]) => [String(id), tasks]),
      ),
    },
  };
}
