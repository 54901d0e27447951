import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Reports" };

export default async function Page() {
  await pageUser("reports.view");
  return <NotBuilt title="Reports" what="Monthly availability and alarm-load reports arrive in a later release." />;
}
