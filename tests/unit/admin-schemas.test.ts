import { describe, expect, it } from "vitest";
import { z } from "zod";
import {
  compressorInputSchema,
  compressorModelInputSchema,
  compressorUpdateSchema,
  stopPressureProblem,
} from "@/shared/compressor-schema";
import { siteInputSchema } from "@/shared/site-schema";
import { userInviteSchema, userUpdateSchema } from "@/shared/user-schema";

const errorsOf = (schema: z.ZodType, input: unknown) => {
  const r = schema.safeParse(input);
  return r.success ? {} : (z.flattenError(r.error).fieldErrors as Record<string, string[]>);
};

const site = { name: "North station", code: "north-1", timeZone: "Europe/London", address: "" };
const model = { name: "Quad 420", maker: "", stages: 4, ratedDeliveryLpm: 680, ratedPressureBar: 420 };
const compressor = {
  name: "Plant room A",
  siteId: 1,
  modelId: 1,
  serial: "SN-0001",
  deviceId: "north-a",
  stopPressureBar: 330,
  restartPressureBar: 290,
  bankVolumeL: 300,
  inService: true,
};
const invite = { email: "Ana@Example.org ", name: "Ana", role: "viewer", allSites: true, siteIds: [], password: "correct horse" };

describe("site schema", () => {
  it("accepts an IANA zone and UTC", () => {
    expect(siteInputSchema.safeParse(site).success).toBe(true);
    expect(siteInputSchema.safeParse({ ...site, timeZone: "UTC" }).success).toBe(true);
    expect(siteInputSchema.safeParse({ ...site, timeZone: "America/Argentina/Buenos_Aires" }).success).toBe(true);
  });

  it.each(["Mars/Olympus_Mons", "", "EST", "GMT+2", "Europe/Londres"])("refuses the time zone %j", (timeZone) => {
    expect(errorsOf(siteInputSchema, { ...site, timeZone }).timeZone).toBeDefined();
  });

  it.each(["North", "north_1", "-north", "nörd", "a".repeat(64)])("refuses the site code %j", (code) => {
    expect(errorsOf(siteInputSchema, { ...site, code }).code).toBeDefined();
  });

  it("requires a name", () => {
    expect(errorsOf(siteInputSchema, { ...site, name: "   " }).name).toEqual(["Enter a name"]);
  });
});

describe("compressor model schema", () => {
  it("accepts a model and coerces form strings", () => {
    const r = compressorModelInputSchema.parse({ ...model, stages: "3", ratedDeliveryLpm: "250.5", ratedPressureBar: "330" });
    expect(r).toMatchObject({ stages: 3, ratedDeliveryLpm: 250.5, ratedPressureBar: 330 });
  });

  it.each([
    ["stages", 0],
    ["stages", 5],
    ["stages", 2.5],
    ["ratedDeliveryLpm", -100],
    ["ratedDeliveryLpm", 0],
    ["ratedPressureBar", -1],
    ["ratedPressureBar", 701],
    ["ratedPressureBar", "abc"],
  ])("refuses %s = %j", (field, value) => {
    expect(errorsOf(compressorModelInputSchema, { ...model, [field]: value })[field]).toBeDefined();
  });
});

describe("compressor schema", () => {
  it("accepts a valid compressor", () => {
    expect(compressorInputSchema.safeParse(compressor).success).toBe(true);
  });

  it.each([
    [340, 330],
    [330, 330],
  ])("refuses restart %d ≥ stop %d at the restart field", (restart, stop) => {
    const errors = errorsOf(compressorInputSchema, { ...compressor, restartPressureBar: restart, stopPressureBar: stop });
    expect(errors.restartPressureBar).toEqual(["Restart pressure must be below the stop pressure"]);
  });

  it("reports restart ≥ stop even while another field is wrong, and in the update schema", () => {
    const bad = { ...compressor, name: "", restartPressureBar: 400 };
    expect(Object.keys(errorsOf(compressorInputSchema, bad)).sort()).toEqual(["name", "restartPressureBar"]);
    expect(errorsOf(compressorUpdateSchema, { ...bad, id: 7 }).restartPressureBar).toBeDefined();
  });

  it.each(["North-A", "north_a", "-north", "north a", "", "x".repeat(64), "north/a", "north+"])("refuses the device id %j", (deviceId) => {
    expect(errorsOf(compressorInputSchema, { ...compressor, deviceId }).deviceId).toBeDefined();
  });

  it.each([
    ["stopPressureBar", -5],
    ["stopPressureBar", 0],
    ["restartPressureBar", -1],
    ["bankVolumeL", -0.5],
    ["siteId", -1],
    ["modelId", 0],
  ])("refuses %s = %j", (field, value) => {
    expect(errorsOf(compressorInputSchema, { ...compressor, [field]: value })[field]).toBeDefined();
  });

  it("accepts an empty bank (0 L) and coerces form strings", () => {
    const r = compressorInputSchema.parse({
      ...compressor,
      siteId: "2",
      modelId: "3",
      stopPressureBar: "300",
      restartPressureBar: "270",
      bankVolumeL: "0",
    });
    expect(r).toMatchObject({ siteId: 2, modelId: 3, stopPressureBar: 300, restartPressureBar: 270, bankVolumeL: 0 });
  });

  it("the update schema needs a numeric id", () => {
    expect(compressorUpdateSchema.safeParse({ ...compressor, id: 4 }).success).toBe(true);
    expect(compressorUpdateSchema.safeParse({ ...compressor, id: "4" }).success).toBe(false);
    expect(compressorUpdateSchema.safeParse(compressor).success).toBe(false);
  });

  it("stopPressureProblem: the stop pressure may equal but not exceed the rated pressure", () => {
    expect(stopPressureProblem(300, 300)).toBeNull();
    expect(stopPressureProblem(299.9, 300)).toBeNull();
    expect(stopPressureProblem(300.1, 300)).toMatch(/above the model's rated 300 bar/);
  });
});

describe("user schemas", () => {
  it("normalises the e-mail and coerces site ids", () => {
    const r = userInviteSchema.parse({ ...invite, siteIds: ["3", 1] });
    expect(r.email).toBe("ana@example.org");
    expect(r.siteIds).toEqual([3, 1]);
  });

  it.each([
    ["email", "not-an-address"],
    ["email", ""],
    ["name", " "],
    ["role", "owner"],
    ["password", "short"],
    ["siteIds", [-1]],
    ["siteIds", "1"],
  ])("refuses %s = %j", (field, value) => {
    expect(errorsOf(userInviteSchema, { ...invite, [field]: value })[field]).toBeDefined();
  });

  it("update needs id, role, the every-site flag, site ids and the disabled flag", () => {
    expect(userUpdateSchema.safeParse({ id: 1, role: "admin", allSites: true, siteIds: [], disabled: false }).success).toBe(true);
    expect(Object.keys(errorsOf(userUpdateSchema, { id: 1, role: "admin" })).sort()).toEqual(["allSites", "disabled", "siteIds"]);
    expect(errorsOf(userUpdateSchema, { id: 0, role: "viewer", allSites: true, siteIds: [], disabled: true }).id).toBeDefined();
  });

  it("an empty site list is no site: a limited person must be given a site or every site", () => {
    expect(errorsOf(userInviteSchema, { ...invite, allSites: false, siteIds: [] }).siteIds).toEqual(["Choose one or more sites, or tick Every site"]);
    expect(userInviteSchema.safeParse({ ...invite, allSites: false, siteIds: [2] }).success).toBe(true);
    expect(userUpdateSchema.safeParse({ id: 1, role: "admin", allSites: false, siteIds: [], disabled: false }).success).toBe(true);
  });
});
