import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Service" };

export default async function Page() {
  await pageUser("service.view");
  return <NotBuilt title="Service" what="Service plans, the service log and interval resets arrive in a later release." />;
}
