import { describe, expect, it } from "vitest";
import { deviceTopicPrefix, newDeviceSecret } from "@/lib/broker/device-credential";
import { constraintViolation } from "@/db/admin";
import { parseTopic, topicFor } from "@/shared/telemetry";

describe("device credential", () => {
  it("secrets are 192-bit, URL-safe and not repeated", () => {
    const secrets = new Set(Array.from({ length: 200 }, newDeviceSecret));
    expect(secrets.size).toBe(200);
    for (const s of secrets) expect(s).toMatch(/^[A-Za-z0-9_-]{32}$/);
  });

  it("the topic prefix covers exactly the device's own channels", () => {
    const prefix = deviceTopicPrefix("north-1", "north-a");
    expect(prefix).toBe("airkeep/v1/north-1/north-a/");
    for (const channel of ["telemetry", "status", "event"] as const) {
      const topic = topicFor("north-1", "north-a", channel);
      expect(topic.startsWith(prefix)).toBe(true);
      expect(parseTopic(topic)).toEqual({ siteCode: "north-1", deviceId: "north-a", channel });
    }
    expect(topicFor("north-1", "north-ab", "telemetry").startsWith(prefix)).toBe(false);
  });
});

describe("constraintViolation", () => {
  it("finds a unique violation through wrapping errors", () => {
    const driver = Object.assign(new Error("UNIQUE constraint failed: compressors.serial"), { code: "SQLITE_CONSTRAINT_UNIQUE" });
    const wrapped = new Error("Failed query", { cause: driver });
    expect(constraintViolation(wrapped)).toEqual({ kind: "unique", columns: ["compressors.serial"] });
  });

  it("reads several columns and recognises foreign keys", () => {
    const pk = Object.assign(new Error("UNIQUE constraint failed: user_sites.user_id, user_sites.site_id"), {
      code: "SQLITE_CONSTRAINT_PRIMARYKEY",
    });
    expect(constraintViolation(pk)).toEqual({ kind: "unique", columns: ["user_sites.user_id", "user_sites.site_id"] });
    const fk = Object.assign(new Error("FOREIGN KEY constraint failed"), { code: "SQLITE_CONSTRAINT_FOREIGNKEY" });
    expect(constraintViolation(fk)).toEqual({ kind: "foreignKey" });
  });

  it("ignores other errors", () => {
    expect(constraintViolation(new Error("disk I/O error"))).toBeNull();
    expect(constraintViolation(null)).toBeNull();
  });
});
