import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { storageConfigFromEnv } from "@/lib/storage/config";
import { openAttachment } from "@/lib/storage/attachments";
import { createObjectStore, type ObjectStore } from "@/lib/storage/object-store";
import { startS3Fake, type S3Fake } from "@/lib/storage/s3-fake";
import { recordAirTestWithCertificate, recordCartridgeChangeWithPhoto } from "@/lib/air-quality/uploads";
import { AirQualityRefusal } from "@/lib/air-quality/service";
import type { AirTestInput } from "@/shared/air-quality-schema";
import { makeTempDb, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";
import { tempDir } from "./notify-fixtures";

// Certificates and photos stored with their record through the real local S3 fake, all or nothing.

const PDF = Buffer.from("%PDF-1.4\n1 0 obj << /Type /Catalog /Pages 2 0 R >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n");

function multipart(bytes: Buffer, name: string, type: string): Request {
  const form = new FormData();
  form.append("file", new Blob([new Uint8Array(bytes)], { type }), name);
  return new Request("http://localhost/api/air-quality/tests", { method: "POST", body: form });
}

const count = (t: TempDb, table: string) => (t.db.$client.prepare(`SELECT count(*) AS n FROM ${table}`).get() as { n: number }).n;

describe("air-test certificate and cartridge photo", () => {
  const tmp = tempDir("airkeep-aq-files-");
  let t: TempDb;
  let fleet: Fleet;
  let fake: S3Fake;
  let store: ObjectStore;
  const tech = { id: 1, name: "Tess Technician", email: "tess@airkeep.demo", siteIds: null as number[] | null };
  const input = (): AirTestInput => ({
    compressorId: fleet.c1,
    sampledAt: Date.now() - 3_600_000,
    samplePoint: "Fill whip",
    fillBar: 300,
    laboratory: "Invented Gas Lab",
    certificateNo: "C-77",
    oxygenPct: 20.9,
    co2Ppm: 400,
    coPpm: 1,
    oilMgM3: 0.1,
    waterValue: 20,
    waterUnit: "mg/m3",
    hydrocarbonsPpm: null,
    odourOk: true,
    note: "",
  });

  beforeAll(async () => {
    t = makeTempDb("airkeep-aq-up-");
    fleet = seedFleet(t.db);
    fake = await startS3Fake({ port: 0, directory: tmp.file("files"), bucket: "airkeep-aq" });
    store = createObjectStore({ ...storageConfigFromEnv({ S3_BUCKET: "airkeep-aq" }), endpoint: fake.url });
  });
  afterAll(async () => {
    store?.close();
    await fake?.close();
    t?.cleanup();
    tmp.remove();
  });

  it("keeps the PDF certificate with the record and serves it to someone in scope", async () => {
    const r = await recordAirTestWithCertificate(t.db, store, tech, input(), multipart(PDF, "cert.pdf", "application/pdf"));
    const row = t.db.$client.prepare("SELECT certificate_attachment_id AS a FROM air_tests WHERE id = ?").get(r.id) as { a: number };
    expect(row.a).toBeGreaterThan(0);
    const viewer = { id: 2, name: "Sam", email: "sam@x", role: "supervisor" as const, siteIds: [fleet.siteA] };
    const opened = await openAttachment(t.db, store, viewer, row.a);
    expect(opened.attachment).toMatchObject({ ownerKind: "air_test", ownerId: r.id, contentType: "application/pdf", name: "cert.pdf" });
    // someone limited to the other site: answered like a file that does not exist
    await expect(openAttachment(t.db, store, { ...viewer, siteIds: [fleet.siteB] }, row.a)).rejects.toThrow();
  });

  it("a certificate that is neither PDF nor image refuses the whole record, with the reason at the field", async () => {
    const before = count(t, "air_tests");
    const text = Buffer.from("just some text, not a certificate\n".repeat(20));
    const e = await recordAirTestWithCertificate(t.db, store, tech, input(), multipart(text, "cert.pdf", "application/pdf")).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AirQualityRefusal);
    expect((e as AirQualityRefusal).fieldErrors?.certificate?.[0]).toMatch(/Only photos .* and PDF documents/);
    expect(count(t, "air_tests")).toBe(before);
  });

  it("a compressor outside the person's sites is refused before the file is read: no record, no file", async () => {
    const files = count(t, "attachments");
    const tests = count(t, "air_tests");
    const limited = { ...tech, siteIds: [fleet.siteA] };
    const refused = await recordAirTestWithCertificate(t.db, store, limited, { ...input(), compressorId: fleet.c2 }, multipart(PDF, "c.pdf", "application/pdf")).catch((x: unknown) => x);
    expect(refused).toBeInstanceOf(AirQualityRefusal);
    expect((refused as AirQualityRefusal).status).toBe(404);
    expect([count(t, "attachments"), count(t, "air_tests")]).toEqual([files, tests]);
  });

  it("logs a cartridge change with a photo", async () => {
    const r = await recordCartridgeChangeWithPhoto(t.db, store, tech, { compressorId: fleet.c1, changedAt: Date.now() - 60_000, hourMeterH: 1200, lot: "L-1", note: "" }, null);
    expect(r.id).toBeGreaterThan(0);
    expect(count(t, "cartridge_changes")).toBe(1);
  });
});
