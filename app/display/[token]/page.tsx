import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { forbidden, notFound } from "next/navigation";
import { Board } from "@/components/board/board";
import { Providers } from "@/components/providers";
import { liveQueries } from "@/components/queries/live";
import { makeQueryClient } from "@/components/query-client";
import { loadBoard } from "@/db/board";
import { getDb } from "@/db/client";
import { resolveDisplayLink } from "@/db/display-links";

export const dynamic = "force-dynamic";

/** A wall screen's read-only board, opened by a display link; a revoked link answers 403. */
export default async function DisplayPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const db = getDb();
  const access = resolveDisplayLink(db, token);
  if (access.status === "revoked") forbidden();
  if (access.status !== "ok") notFound();
  const source = { kind: "display", token } as const;
  const client = makeQueryClient();
  await client.prefetchQuery({ ...liveQueries.board(source), queryFn: () => loadBoard(db, access.siteIds) });
  return (
    <Providers units={access.units}>
      <HydrationBoundary state={dehydrate(client)}>
        <Board source={source} title={access.label} theme={access.theme} />
      </HydrationBoundary>
    </Providers>
  );
}
