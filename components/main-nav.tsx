"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { can, type Role } from "@/shared/roles";
import { navItems } from "./nav-items";

export function MainNav({ role }: { role: Role }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Main" className="flex flex-wrap gap-1">
      {navItems
        .filter((item) => can(role, item.permission))
        .map((item) => {
          const active = pathname === item.href || pathname.startsWith(`${item.href}/`);
          return (
            <Link
              key={item.href}
              href={item.href}
              aria-current={active ? "page" : undefined}
              className={`rounded px-3 py-1.5 text-sm font-medium no-underline ${
                active ? "bg-ink text-raised" : "text-ink hover:bg-raised"
              }`}
            >
              {item.label}
            </Link>
          );
        })}
    </nav>
  );
}
