import { PageLoading } from "@/components/route/route-states";

export default function Loading() {
  return <PageLoading />;
}
