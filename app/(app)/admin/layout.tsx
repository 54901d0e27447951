import type { ReactNode } from "react";
import { AdminNav } from "@/components/admin/admin-nav";
import { pageUser } from "@/lib/auth/current-user";

export default async function AdminLayout({ children }: { children: ReactNode }) {
  const user = await pageUser("admin.view");
  return (
    <div className="mx-auto max-w-7xl space-y-3">
      <AdminNav role={user.role} />
      {children}
    </div>
  );
}
