import type { ReactNode } from "react";
import { pageUser } from "@/lib/auth/current-user";

// The permission is settled here, above the loading screen: once that streams, a 403 could no longer be sent.
export default async function ReportsLayout({ children }: { children: ReactNode }) {
  await pageUser("reports.view");
  return children;
}
