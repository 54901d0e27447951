"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { can, type Role } from "@/shared/roles";
import { adminSections } from "./sections";


export function AdminNav({ role }: { role: Role }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Admin" className="flex flex-wrap gap-1 border-b border-line pb-2">
      <Link
        href="/admin"
        aria-current={pathname === "/admin" ? "page" : undefined}
        className={`rounded px-2 py-1 text-sm no-underline ${pathname === "/admin" ? "bg-ink text-raised" : "text-ink hover:bg-raised"}`}
      >
        Overview
      </Link>
      {adminSections
        .filter((s) => can(role, s.permission))
        .map((s) => {
          const active = pathname === s.href || pathname.startsWith(`${s.href}/`);
          return (
            <Link
              key={s.href}
              href={s.href}
              aria-current={active ? "page" : undefined}
              className={`rounded px-2 py-1 text-sm no-underline ${active ? "bg-ink text-raised" : "text-ink hover:bg-raised"}`}
            >
              {s.label}
            </Link>
          );
        })}
    </nav>
  );
}
