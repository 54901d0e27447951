import Link from "next/link";
import { adminSections } from "@/components/admin/sections";
import { getDb } from "@/db/client";
import { listCompressors, listModels } from "@/db/compressors";
import { listSites } from "@/db/sites";
import { listUsers } from "@/db/users";
import { pageUser } from "@/lib/auth/current-user";
import { can } from "@/shared/roles";

export const metadata = { title: "Admin" };

export default async function AdminIndexPage() {
  const user = await pageUser("admin.view");
  const db = getDb();
  const users = listUsers(db);
  const compressors = listCompressors(db, null);
  const counts: Record<string, string> = {
    "/admin/users": `${users.length} accounts, ${users.filter((u) => u.disabled).length} disabled`,
    "/admin/sites": `${listSites(db, null).length} sites`,
    "/admin/models": `${listModels(db).length} models`,
    "/admin/compressors": `${compressors.length} compressors, ${compressors.filter((c) => !c.hasDeviceCredential).length} without a device credential`,
  };
  return (
    <section className="space-y-3">
      <h1 className="text-xl font-semibold">Admin</h1>
      <ul className="grid gap-3 md:grid-cols-2">
        {adminSections
          .filter((s) => can(user.role, s.permission))
          .map((s) => (
            <li key={s.href} className="rounded border border-line bg-panel p-3">
              <Link href={s.href} className="text-base font-semibold text-ink">
                {s.label}
              </Link>
              <p className="mt-1 text-sm text-muted">{s.what}</p>
              {counts[s.href] && <p className="num mt-1 text-xs text-muted">{counts[s.href]}</p>}
            </li>
          ))}
      </ul>
      <p className="text-sm text-muted">Every change made here is written to the audit log with who made it, when, and the values before and after.</p>
    </section>
  );
}
