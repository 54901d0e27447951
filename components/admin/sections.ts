import type { Permission } from "@/shared/roles";

/** The admin area's sections, shared by its navigation (client) and its index page (server). */
export const adminSections: { href: string; label: string; permission: Permission; what: string }[] = [
  { href: "/admin/users", label: "Users", permission: "admin.users", what: "Accounts, roles, site scopes; invite, disable and enable." },
  { href: "/admin/sites", label: "Sites", permission: "admin.sites", what: "Names, codes used in MQTT topics, time zones, addresses." },
  {
    href: "/admin/models",
    label: "Compressor models",
    permission: "admin.compressors",
    what: "Stages, rated delivery and rated pressure shared by compressors of one model.",
  },
  {
    href: "/admin/compressors",
    label: "Compressors",
    permission: "admin.compressors",
    what: "Each unit's site, model, serial, device id, setpoints, bank volume and device credential.",
  },
  {
    href: "/admin/displays",
    label: "Display links",
    permission: "admin.displays",
    what: "Revocable links that open the board without navigation on a wall screen.",
  },
  {
    href: "/admin/contacts",
    label: "Contacts & on-call",
    permission: "admin.mail",
    what: "Who is e-mailed about alarms: contacts, rules by site and priority, escalation order, each site's on-call rota.",
  },
  {
    href: "/admin/mailbox",
    label: "Mailbox",
    permission: "admin.mail",
    what: "The outgoing alarm e-mail queue, and what the built-in SMTP fake received.",
  },
];
