import Link from "next/link";
import type { ReactNode } from "react";
import { CriticalToast } from "@/components/alarms/critical-toast";
import { HistoryNotice } from "@/components/history-notice";
import { MainNav } from "@/components/main-nav";
import { Providers } from "@/components/providers";
import { SafetyNotice } from "@/components/safety-notice";
import { SignOutButton } from "@/components/sign-out-button";
import { UnitsPicker } from "@/components/units-picker";
import { getDb } from "@/db/client";
import { backfillStatus } from "@/db/history-backfill";
import { processAlive } from "@/lib/process-alive";
import { pageUser } from "@/lib/auth/current-user";
import { roleLabels } from "@/shared/roles";

export default async function SignedInLayout({ children }: { children: ReactNode }) {
  const user = await pageUser();
  return (
    <Providers units={user.units}>
      <div className="flex min-h-screen flex-col">
        <header className="no-print flex flex-wrap items-center gap-4 border-b border-line bg-panel px-4 py-2">
          <Link href="/board" className="text-lg font-bold tracking-tight text-ink no-underline">
            Airkeep
          </Link>
          <MainNav role={user.role} />
          <div className="ml-auto flex flex-wrap items-center gap-4">
            <UnitsPicker units={user.units} />
            <span className="text-sm" data-testid="signed-in-as">
              {user.name} · <span className="font-semibold">{roleLabels[user.role]}</span>
            </span>
            <SignOutButton />
          </div>
        </header>
        <HistoryNotice initial={backfillStatus(getDb(), processAlive)} />
        <main className="flex-1 px-4 py-4">{children}</main>
        <SafetyNotice sticky compact />
        <CriticalToast />
      </div>
    </Providers>
  );
}
