import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CompressorLive } from "@/components/compressor/compressor-live";
import { DeliveryHealth } from "@/components/compressor/delivery-health";
import { DeviceEvents } from "@/components/compressor/device-events";
import { TrendChart } from "@/components/compressor/trend-chart";
import { liveQueries } from "@/components/queries/live";
import { trendQueries } from "@/components/queries/trends";
import { makeQueryClient } from "@/components/query-client";
import { loadLiveState } from "@/db/board";
import { getDb } from "@/db/client";
import { getCompressor } from "@/db/compressors";
import { deliveryHealth } from "@/db/delivery";
import { listDeviceEvents, readTrend } from "@/db/trends";
import { inScope, pageUser, type CurrentUser } from "@/lib/auth/current-user";
import { CompressorService } from "@/components/service/compressor-service";
import { listServiceLog, serviceDueList } from "@/db/service";
import { can } from "@/shared/roles";
import { compressorIdSchema, type CompressorDetail } from "@/shared/board";
import type { CompressorDto } from "@/shared/compressor-schema";
import { CompressorAirSection } from "@/components/air-quality/compressor-air-section";
import { airQualityOverview } from "@/lib/air-quality/service";
import { listAirTests, ownRating } from "@/db/air-quality";
import { localDate } from "@/shared/month";

function AirQualityPart({ compressorId, siteIds, isAdmin }: { compressorId: number; siteIds: number[] | null; isAdmin: boolean }) {
  const db = getDb();
  const row = airQualityOverview(db, siteIds, Date.now(), compressorId)[0];
  if (!row) return null;
  const last = listAirTests(db, { compressorId, siteIds, limit: 1 })[0] ?? null;
  const due = row.nextDueAt != null ? `${localDate(row.nextDueAt, row.timeZone)}${row.overdueDays > 0 ? ` (overdue ${row.overdueDays} d)` : ""}` : "now";
  const override = isAdmin
    ? { modelId: compressorId, modelName: "Override", backPressureBar: row.cartridge.backPressureBar, rating: ownRating(db, "compressor", compressorId) }
    : undefined;
  return <CompressorAirSection cartridge={row.cartridge} lastTest={last} nextDueAt={due} timeZone={row.timeZone} override={override} />;
}

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ id: string }> };

async function viewable(params: Props["params"]): Promise<{ compressor: CompressorDto; user: CurrentUser }> {
  const user = await pageUser("compressors.view");
  const id = compressorIdSchema.safeParse((await params).id);
  if (!id.success) notFound();
  const compressor = getCompressor(getDb(), id.data);
  // Outside the person's sites reads exactly like a compressor that does not exist.
  if (!compressor || !inScope(user, compressor.siteId)) notFound();
  return { compressor, user };
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { compressor } = await viewable(params);
  return { title: `${compressor.name} · ${compressor.siteName}` };
}

const DEFAULT_SIGNAL = "deliveryBar" as const;
const DEFAULT_SPAN = "6h" as const;

export default async function CompressorPage({ params }: Props) {
  const { compressor, user } = await viewable(params);
  const db = getDb();
  const now = Date.now();
  const mayReadLog = can(user.role, "service.view");
  const serviceDue = serviceDueList(db, now, user.siteIds, compressor.id);
  const serviceLog = mayReadLog ? listServiceLog(db, { siteIds: user.siteIds, compressor: compressor.id, limit: 5 }) : null;
  const client = makeQueryClient();
  const detail: CompressorDetail = { at: Date.now(), compressor, ...loadLiveState(db, compressor.id) };
  await Promise.all([
    client.prefetchQuery({ ...liveQueries.compressor(compressor.id), queryFn: () => detail }),
    client.prefetchQuery({ ...trendQueries.deliveries(compressor.id), queryFn: () => deliveryHealth(db, compressor.id) }),
    client.prefetchQuery({ ...trendQueries.events(compressor.id), queryFn: () => listDeviceEvents(db, compressor.id, { limit: 100 }) }),
    client.prefetchQuery({
      ...trendQueries.trend(compressor.id, DEFAULT_SIGNAL, DEFAULT_SPAN),
      queryFn: () => readTrend(db, compressor.id, DEFAULT_SIGNAL, DEFAULT_SPAN),
    }),
  ]);
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <div className="mx-auto max-w-7xl space-y-5">
        <nav aria-label="Breadcrumb" className="text-sm">
          <Link href="/board">Board</Link> <span aria-hidden>›</span> <span>{compressor.siteName}</span>
        </nav>
        <CompressorLive id={compressor.id} />
        <TrendChart
          compressorId={compressor.id}
          stages={compressor.stages}
          timeZone={compressor.timeZone}
          initialSignal={DEFAULT_SIGNAL}
          initialSpan={DEFAULT_SPAN}
        />
        <DeliveryHealth compressorId={compressor.id} timeZone={compressor.timeZone} />
        <CompressorService due={serviceDue} log={serviceLog} linkToService={mayReadLog} compressorId={compressor.id} />
        {can(user.role, "airquality.view") && <AirQualityPart compressorId={compressor.id} siteIds={user.siteIds} isAdmin={can(user.role, "admin.compressors")} />}
        <DeviceEvents compressorId={compressor.id} timeZone={compressor.timeZone} />
      </div>
    </HydrationBoundary>
  );
}
