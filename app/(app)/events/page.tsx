import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Events" };

export default async function Page() {
  await pageUser("events.view");
  return <NotBuilt title="Events" what="The searchable event log arrives with alarm handling." />;
}
