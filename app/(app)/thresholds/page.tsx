import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Thresholds" };

export default async function Page() {
  await pageUser("thresholds.view");
  return <NotBuilt title="Thresholds" what="Threshold tuning with a backtest against history arrives in a later release." />;
}
