import { dehydrate, HydrationBoundary } from "@tanstack/react-query";
import { Board } from "@/components/board/board";
import { liveQueries } from "@/components/queries/live";
import { makeQueryClient } from "@/components/query-client";
import { loadBoard } from "@/db/board";
import { getDb } from "@/db/client";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Board" };
export const dynamic = "force-dynamic";

export default async function BoardPage() {
  const user = await pageUser("board.view");
  const client = makeQueryClient();
  await client.prefetchQuery({ ...liveQueries.board({ kind: "user" }), queryFn: () => loadBoard(getDb(), user.siteIds) });
  return (
    <HydrationBoundary state={dehydrate(client)}>
      <Board source={{ kind: "user" }} title="Board" />
    </HydrationBoundary>
  );
}
