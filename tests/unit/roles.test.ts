import { describe, expect, it } from "vitest";
import { can, denialReason, permissions, permissionTable, roles } from "@/shared/roles";

describe("permission table", () => {
  it("lets every role read the board, alarms and events", () => {
    for (const role of roles) {
      expect(can(role, "board.view")).toBe(true);
      expect(can(role, "events.view")).toBe(true);
    }
  });

  it("keeps administration to admins", () => {
    for (const role of roles) expect(can(role, "admin.users")).toBe(role === "admin");
  });

  it("gives each role the duties its people have", () => {
    expect(can("supervisor", "alarms.acknowledge")).toBe(true);
    expect(can("supervisor", "alarms.shelve")).toBe(true);
    expect(can("supervisor", "thresholds.edit")).toBe(false);
    expect(can("technician", "service.reset")).toBe(true);
    expect(can("technician", "airquality.record")).toBe(true);
    expect(can("technician", "thresholds.edit")).toBe(false);
    expect(can("engineer", "thresholds.edit")).toBe(true);
    expect(can("manager", "reports.view")).toBe(true);
    expect(can("manager", "alarms.acknowledge")).toBe(false);
    expect(can("viewer", "alarms.acknowledge")).toBe(false);
    expect(can("viewer", "reports.view")).toBe(false);
  });

  it("refuses no role and unknown roles", () => {
    expect(can(null, "board.view")).toBe(false);
    expect(can(undefined, "board.view")).toBe(false);
    expect(can("root" as never, "board.view")).toBe(false);
  });

  it("names only real roles and gives every admin every permission", () => {
    for (const p of permissions) {
      for (const r of permissionTable[p]) expect(roles).toContain(r);
      expect(can("admin", p)).toBe(true);
    }
  });

  it("explains a refusal with the roles that may", () => {
    expect(denialReason("thresholds.edit")).toBe("Only engineer, administrator accounts may do this.");
  });
});
