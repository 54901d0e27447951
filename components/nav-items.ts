import type { Permission } from "@/shared/roles";

export type NavItem = { href: string; label: string; permission: Permission };

export const navItems: NavItem[] = [
  { href: "/board", label: "Board", permission: "board.view" },
  { href: "/alarms", label: "Alarms", permission: "alarms.view" },
  { href: "/events", label: "Events", permission: "events.view" },
  { href: "/thresholds", label: "Thresholds", permission: "thresholds.view" },
  { href: "/service", label: "Service", permission: "service.view" },
  { href: "/air-quality", label: "Air quality", permission: "airquality.view" },
  { href: "/reports", label: "Reports", permission: "reports.view" },
  { href: "/admin", label: "Admin", permission: "admin.view" },
];
