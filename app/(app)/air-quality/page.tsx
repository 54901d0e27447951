import { NotBuilt } from "@/components/not-built";
import { pageUser } from "@/lib/auth/current-user";

export const metadata = { title: "Air quality" };

export default async function Page() {
  await pageUser("airquality.view");
  return <NotBuilt title="Air quality" what="Air-quality test records judged against a chosen standard arrive in a later release." />;
}
