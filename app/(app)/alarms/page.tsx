import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { AlarmList } from "@/components/alarms/alarm-list";
import { lenientAlarmListParams } from "@/shared/alarm-list-params";
import { alarmQueries } from "@/components/queries/alarms";
import { makeQueryClient } from "@/components/query-client";
import { getAlarm, listAlarms } from "@/db/alarms";
import { getDb } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { inScope, pageUser } from "@/lib/auth/current-user";

export const dynamic = "force-dynamic";
export const metadata = { title: "Alarms" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

/** /alarms — filters in the address (site, compressor, priority, state); ?id=<alarm> opens one alarm (e-mail links). */
export default async function AlarmsPage({ searchParams }: Props) {
  const user = await pageUser("alarms.view");
  const raw = await searchParams;
  const params = lenientAlarmListParams(raw);
  const idRaw = Array.isArray(raw.id) ? raw.id[0] : raw.id;
  const highlightId = idRaw && /^\d{1,12}$/.test(idRaw) ? Number(idRaw) : null;

  const db = getDb();
  const client = makeQueryClient();
  const at = Date.now();
  await client.prefetchQuery({
    ...alarmQueries.list(),
    queryFn: () => ({ alarms: listAlarms(db, { siteIds: user.siteIds }), at }),
  });
  if (highlightId !== null) {
    const alarm = getAlarm(db, highlightId);
    // Outside the person's sites reads exactly like an alarm that does not exist (the client shows that).
    if (alarm && inScope(user, alarm.siteId)) client.setQueryData(alarmQueries.one(highlightId).queryKey, { alarm, at });
  }
  const sites = listSites(db, user.siteIds).map((s) => ({ id: s.id, name: s.name }));
  const compressors = listCompressors(db, user.siteIds).map((c) => ({ id: c.id, name: c.name, siteId: c.siteId }));

  return (
    <HydrationBoundary state={dehydrate(client)}>
      <div className="mx-auto max-w-7xl">
        <AlarmList role={user.role} sites={sites} compressors={compressors} initial={params} highlightId={highlightId} />
      </div>
    </HydrationBoundary>
  );
}
