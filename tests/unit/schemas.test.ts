import { describe, expect, it } from "vitest";
import { compressorInputSchema, compressorModelInputSchema, stopPressureProblem } from "@/shared/compressor-schema";
import { siteInputSchema } from "@/shared/site-schema";
import { signInSchema, userInviteSchema } from "@/shared/user-schema";

const compressor = {
  name: "Unit 1",
  siteId: 1,
  modelId: 1,
  serial: "SN-1",
  deviceId: "unit-1",
  stopPressureBar: 300,
  restartPressureBar: 270,
  bankVolumeL: 100,
  inService: true,
};

function fieldErrors(result: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) {
  return (result.error?.issues ?? []).map((i) => i.path.join("."));
}

describe("shared form schemas", () => {
  it("accepts a valid compressor and refuses a restart pressure at or above the stop pressure", () => {
    expect(compressorInputSchema.safeParse(compressor).success).toBe(true);
    const r = compressorInputSchema.safeParse({ ...compressor, restartPressureBar: 300 });
    expect(fieldErrors(r)).toEqual(["restartPressureBar"]);
  });

  it("refuses bad device ids, negative volumes and non-numbers", () => {
    expect(fieldErrors(compressorInputSchema.safeParse({ ...compressor, deviceId: "Unit 1/#" }))).toContain("deviceId");
    expect(fieldErrors(compressorInputSchema.safeParse({ ...compressor, bankVolumeL: -5 }))).toContain("bankVolumeL");
    expect(fieldErrors(compressorInputSchema.safeParse({ ...compressor, stopPressureBar: "abc" }))).toContain("stopPressureBar");
  });

  it("checks the stop pressure against the model's rating", () => {
    expect(stopPressureProblem(420, 330)).toMatch(/rated 330 bar/);
    expect(stopPressureProblem(300, 330)).toBeNull();
  });

  it("bounds model stages to what the telemetry carries", () => {
    const model = { name: "M", maker: "", stages: 4, ratedDeliveryLpm: 250, ratedPressureBar: 330 };
    expect(compressorModelInputSchema.safeParse(model).success).toBe(true);
    expect(fieldErrors(compressorModelInputSchema.safeParse({ ...model, stages: 5 }))).toEqual(["stages"]);
    expect(fieldErrors(compressorModelInputSchema.safeParse({ ...model, stages: 2.5 }))).toEqual(["stages"]);
  });

  it("accepts IANA time zones only", () => {
    const site = { name: "S", code: "s-1", timeZone: "Europe/Oslo", address: "" };
    expect(siteInputSchema.safeParse(site).success).toBe(true);
    expect(fieldErrors(siteInputSchema.safeParse({ ...site, timeZone: "Mars/Olympus" }))).toEqual(["timeZone"]);
    expect(fieldErrors(siteInputSchema.safeParse({ ...site, timeZone: "CET+1" }))).toEqual(["timeZone"]);
  });

  it("normalises e-mail addresses and requires a long enough password on invite", () => {
    expect(signInSchema.parse({ email: " Admin@Example.ORG ", password: "x" }).email).toBe("admin@example.org");
    const invite = { email: "a@b.org", name: "A", role: "viewer", allSites: true, siteIds: [], password: "short" };
    expect(fieldErrors(userInviteSchema.safeParse(invite))).toEqual(["password"]);
    expect(fieldErrors(userInviteSchema.safeParse({ ...invite, password: "long-enough-1", role: "root" }))).toEqual(["role"]);
  });
});

describe("administrators' site scope", () => {
  it("is always every site: an admin with a site list is refused at the site field", () => {
    const invite = { email: "a@b.org", name: "A", role: "admin", allSites: false, siteIds: [2], password: "long-enough-1" };
    expect(fieldErrors(userInviteSchema.safeParse(invite))).toEqual(["siteIds"]);
    expect(userInviteSchema.safeParse({ ...invite, siteIds: [] }).success).toBe(true);
    expect(userInviteSchema.safeParse({ ...invite, role: "technician" }).success).toBe(true);
    // Anyone else must choose: some sites, or every site; an empty list alone is refused.
    expect(fieldErrors(userInviteSchema.safeParse({ ...invite, role: "technician", siteIds: [] }))).toEqual(["siteIds"]);
  });
});
