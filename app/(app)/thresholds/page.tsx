import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { notFound } from "next/navigation";
import { z } from "zod";
import { thresholdQueries } from "@/components/queries/thresholds";
import { makeQueryClient } from "@/components/query-client";
import { ThresholdsView } from "@/components/thresholds/thresholds-view";
import { getDb } from "@/db/client";
import { getThresholdSet, thresholdHistory, thresholdOverview } from "@/db/threshold-edit";
import { pageUser } from "@/lib/auth/current-user";
import type { ScopeType } from "@/shared/threshold-schema";

export const dynamic = "force-dynamic";
export const metadata = { title: "Thresholds" };

const idSchema = z.coerce.number().int().positive();

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function ThresholdsPage({ searchParams }: Props) {
  const user = await pageUser("thresholds.view");
  const db = getDb();
  const sp = await searchParams;
  const overview = thresholdOverview(db, user);

  // ?compressor=5 or ?model=3; with neither, the first compressor of the person's (or the first template).
  let scope: { scopeType: ScopeType; scopeId: number } | null = null;
  for (const scopeType of ["compressor", "model"] as const) {
    const raw = sp[scopeType];
    if (raw === undefined) continue;
    const id = idSchema.safeParse(Array.isArray(raw) ? raw[0] : raw);
    if (!id.success) notFound();
    scope = { scopeType, scopeId: id.data };
    break;
  }
  if (!scope) {
    const first = overview.models.find((m) => m.compressors.length > 0);
    if (first) scope = { scopeType: "compressor", scopeId: first.compressors[0]!.id };
    else if (overview.models[0]) scope = { scopeType: "model", scopeId: overview.models[0].id };
  }
  if (!scope) {
    return (
      <section className="max-w-2xl space-y-2">
        <h1 className="text-2xl font-semibold">Thresholds</h1>
        <p className="text-muted">No compressor models yet: an administrator adds them under Admin.</p>
      </section>
    );
  }
  const set = getThresholdSet(db, scope.scopeType, scope.scopeId, user);
  if (!set) notFound();

  const client = makeQueryClient();
  client.setQueryData(thresholdQueries.overview().queryKey, overview);
  client.setQueryData(thresholdQueries.set(scope.scopeType, scope.scopeId).queryKey, set);
  client.setQueryData(thresholdQueries.history(scope.scopeType, scope.scopeId).queryKey, thresholdHistory(db, scope.scopeType, scope.scopeId, user) ?? []);
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <ThresholdsView scopeType={scope.scopeType} scopeId={scope.scopeId} />
    </HydrationBoundary>
  );
}
