import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CompressorLive } from "@/components/compressor/compressor-live";
import { DeviceEvents } from "@/components/compressor/device-events";
import { TrendChart } from "@/components/compressor/trend-chart";
import { liveQueries } from "@/components/queries/live";
import { trendQueries } from "@/components/queries/trends";
import { makeQueryClient } from "@/components/query-client";
import { loadLiveState } from "@/db/board";
import { getDb } from "@/db/client";
import { getCompressor } from "@/db/compressors";
import { listDeviceEvents, readTrend } from "@/db/trends";
import { inScope, pageUser } from "@/lib/auth/current-user";
import { compressorIdSchema, type CompressorDetail } from "@/shared/board";
import type { CompressorDto } from "@/shared/compressor-schema";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ id: string }> };

async function viewable(params: Props["params"]): Promise<CompressorDto> {
  const user = await pageUser("compressors.view");
  const id = compressorIdSchema.safeParse((await params).id);
  if (!id.success) notFound();
  const compressor = getCompressor(getDb(), id.data);
  // Outside the person's sites reads exactly like a compressor that does not exist.
  if (!compressor || !inScope(user, compressor.siteId)) notFound();
  return compressor;
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const compressor = await viewable(params);
  return { title: `${compressor.name} · ${compressor.siteName}` };
}

const DEFAULT_SIGNAL = "deliveryBar" as const;
const DEFAULT_SPAN = "6h" as const;

export default async function CompressorPage({ params }: Props) {
  const compressor = await viewable(params);
  const db = getDb();
  const client = makeQueryClient();
  const detail: CompressorDetail = { at: Date.now(), compressor, ...loadLiveState(db, compressor.id) };
  await Promise.all([
    client.prefetchQuery({ ...liveQueries.compressor(compressor.id), queryFn: () => detail }),
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
        <DeviceEvents compressorId={compressor.id} timeZone={compressor.timeZone} />
      </div>
    </HydrationBoundary>
  );
}
