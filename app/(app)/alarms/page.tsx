import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Alarms" };

export default async function Page() {
  await pageUser("alarms.view");
  return <NotBuilt title="Alarms" what="The active alarm list with acknowledge and shelve arrives with alarm handling." />;
}
