import { z } from "zod";

export const roles = ["viewer", "supervisor", "technician", "engineer", "manager", "admin"] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

export const roleLabels: Record<Role, string> = {
  viewer: "Viewer",
  supervisor: "Shift supervisor",
  technician: "Technician",
  engineer: "Engineer",
  manager: "Manager",
  admin: "Administrator",
};

const everyone = roles;

// The one table the server enforces and the client reads to hide or disable controls.
export const permissionTable = {
  "board.view": everyone,
  "compressors.view": everyone,
  "alarms.view": everyone,
  "events.view": everyone,
  "alarms.acknowledge": ["supervisor", "technician", "engineer", "admin"],
  "alarms.shelve": ["supervisor", "engineer", "admin"],
  "notes.write": ["supervisor", "technician", "engineer", "admin"],
  "thresholds.view": ["technician", "engineer", "admin"],
  "thresholds.edit": ["engineer", "admin"],
  // Supervisors see what is due or under service at their sites (which unit is out for service, whose oil is overdue).
  "service.view": ["supervisor", "technician", "engineer", "manager", "admin"],
  "service.log": ["technician", "admin"],
  "service.reset": ["technician", "admin"],
  "service.plan": ["technician", "engineer", "admin"],
  "service.correct": ["admin"],
  "airquality.view": ["supervisor", "technician", "engineer", "manager", "admin"],
  "airquality.record": ["technician", "admin"],
  "reports.view": ["manager", "engineer", "admin"],
  "admin.view": ["admin"],
  "admin.users": ["admin"],
  "admin.sites": ["admin"],
  "admin.compressors": ["admin"],
  "admin.displays": ["admin"],
  "admin.mail": ["admin"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissionTable;
export const permissions = Object.keys(permissionTable) as Permission[];

export function can(role: Role | null | undefined, permission: Permission): boolean {
  if (!role) return false;
  return (permissionTable[permission] as readonly Role[]).includes(role);
}

export function rolesWith(permission: Permission): readonly Role[] {
  return permissionTable[permission];
}

/** The sentence shown beside a hidden or disabled control. */
export function denialReason(permission: Permission): string {
  const allowed = rolesWith(permission).map((r) => roleLabels[r].toLowerCase());
  return `Only ${allowed.join(", ")} accounts may do this.`;
}
