import { createHash } from "node:crypto";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import { auditLog, serviceLog } from "@/db/schema";
import { storageConfigFromEnv } from "@/lib/storage/config";
import { AttachmentNotFound, contentDisposition, listOwnerAttachments, openAttachment, uploadAttachment } from "@/lib/storage/attachments";
import { createObjectStore, type ObjectStore } from "@/lib/storage/object-store";
import { startS3Fake, type S3Fake } from "@/lib/storage/s3-fake";
import { MAX_ATTACHMENT_BYTES } from "@/shared/attachment-schema";
import { openWorld, tempDir, type World } from "./notify-fixtures";

// Upload round trip against the real local S3 fake (s3rver on 127.0.0.1), through the same code the route handlers call.

/** A 1×1 PNG: signature, IHDR, IDAT, IEND (PNG specification, W3C 2003). */
const PNG_1x1 = Buffer.from(
  "89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d49444154789c6360000002000154a24f5d0000000049454e44ae426082",
  "hex",
);
const PDF = Buffer.from("%PDF-1.4\n1 0 obj << /Type /Catalog /Pages 2 0 R >> endobj\n2 0 obj << /Type /Pages /Kids [] /Count 0 >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n");

function multipart(file: Blob | Buffer, name: string, type: string): Request {
  const form = new FormData();
  form.append("file", file instanceof Blob ? file : new Blob([new Uint8Array(file)], { type }), name);
  return new Request("http://localhost/api/attachments", { method: "POST", body: form });
}

const sha = (b: Buffer) => createHash("sha256").update(b).digest("hex");

async function readAll(s: ReadableStream<Uint8Array>): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const c of s as unknown as AsyncIterable<Uint8Array>) chunks.push(Buffer.from(c));
  return Buffer.concat(chunks);
}

describe("attachments against the local S3 fake", () => {
  const tmp = tempDir("airkeep-storage-");
  let w: World;
  let fake: S3Fake;
  let store: ObjectStore;
  let londonLog: number;
  let osloLog: number;
  const now = Date.UTC(2026, 2, 1);
  const tech = { id: 1, name: "Tess Technician", email: "tess@airkeep.demo", role: "technician" as const, siteIds: null as number[] | null };

  beforeAll(async () => {
    w = openWorld(tmp.file("a.db"), now);
    fake = await startS3Fake({ port: 0, directory: tmp.file("files"), bucket: "airkeep-test" });
    store = createObjectStore({ ...storageConfigFromEnv({ S3_BUCKET: "airkeep-test" }), endpoint: fake.url });
    const entry = (compressorId: number, siteId: number, sub: string) =>
      w.db.insert(serviceLog).values({ compressorId, siteId, doneAt: now, tasks: [], submissionId: sub, createdAt: now }).returning().get().id;
    londonLog = entry(w.mb1, w.london, "s1");
    osloLog = entry(w.hr1, w.oslo, "s2");
  });
  afterAll(async () => {
    store?.close();
    await fake?.close();
    w?.db.$client.close();
    tmp.remove();
  });

  it("stores a photo, lists it and gives back the same bytes", async () => {
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(PNG_1x1, "valve plate.png", "image/png"));
    expect(r.status).toBe(201);
    if (!("attachment" in r) || !r.attachment) throw new Error("no attachment");
    expect(r.attachment).toMatchObject({ status: "stored", name: "valve plate.png", contentType: "image/png", size: PNG_1x1.length, sha256: sha(PNG_1x1) });

    const list = listOwnerAttachments(w.db, tech, { ownerKind: "service_log", ownerId: londonLog });
    expect(list.map((a) => a.id)).toEqual([r.attachment.id]);

    const opened = await openAttachment(w.db, store, tech, r.attachment.id);
    expect((await readAll(opened.body)).equals(PNG_1x1)).toBe(true);
  });

  it("keeps a PDF whatever type the browser claims, and the stored key is generated", async () => {
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(PDF, "worksheet.jpg", "image/jpeg"));
    expect(r.status).toBe(201);
    const row = w.db.query.attachments.findFirst({ where: (a, { eq: e }) => e(a.id, r.attachment!.id) }).sync();
    expect(row?.contentType).toBe("application/pdf");
    expect(row?.key).toMatch(/^service_log\/\d{4}\/\d{2}\/[0-9a-f-]{36}\.pdf$/);
    expect(row?.key).not.toContain("worksheet");
  });

  it("refuses a file whose bytes are not an image or PDF, though it is named and typed as one", async () => {
    const before = auditCount("attachment.rejected");
    const text = Buffer.from("#!/bin/sh\necho this is not a photo\n".repeat(50));
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(text, "photo.png", "image/png"));
    expect(r.status).toBe(415);
    expect("reason" in r && r.reason).toBe("type");
    expect(auditCount("attachment.rejected")).toBe(before + 1);
    expect(listOwnerAttachments(w.db, tech, { ownerKind: "service_log", ownerId: londonLog }).every((a) => a.name !== "photo.png")).toBe(true);
  });

  it("refuses a file over 20 MB while streaming, and keeps nothing of it", async () => {
    // Declares no length up front (a stream), so the limit must hold while the bytes arrive.
    const big = Buffer.alloc(MAX_ATTACHMENT_BYTES + 1024 * 1024);
    PNG_1x1.copy(big);
    const form = new FormData();
    form.append("file", new Blob([new Uint8Array(big)], { type: "image/png" }), "huge.png");
    const encoded = new Response(form);
    const body = encoded.body!;
    const type = encoded.headers.get("content-type")!;
    const req = new Request("http://localhost/api/attachments", { method: "POST", body, headers: { "content-type": type }, duplex: "half" } as RequestInit);
    const before = storedObjects();
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, req);
    expect(r).toMatchObject({ status: 413 });
    expect(storedObjects()).toBe(before);
    expect(listOwnerAttachments(w.db, tech, { ownerKind: "service_log", ownerId: londonLog }).some((a) => a.name === "huge.png")).toBe(false);
  });

  it("refuses an empty file", async () => {
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(Buffer.alloc(0), "empty.png", "image/png"));
    expect(r.status).toBe(400);
    expect("reason" in r && r.reason).toBe("empty");
  });

  const jpeg = Buffer.concat([Buffer.from("ffd8ffe000104a46494600010100000100010000", "hex"), Buffer.alloc(200, 1), Buffer.from("ffd9", "hex")]);

  it("keeps only the last segment of a file name, without control or bidi-override characters", async () => {
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(jpeg, "..\\..\\etc/pass\u0085wd\u202egpj.jpg", "image/jpeg"));
    expect(r).toMatchObject({ status: 201 });
    expect(r.attachment?.name).toBe("passwdgpj.jpg");
    expect("notice" in r && r.notice).toContain("cleaned");
  });

  it("refuses a form whose file name carries a raw control character, with its own sentence", async () => {
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(jpeg, "bell\u0007.jpg", "image/jpeg"));
    expect(r).toMatchObject({ status: 400, reason: "malformed" });
  });

  it("answers a repeated upload of the same file with the entry it already has", async () => {
    const first = listOwnerAttachments(w.db, tech, { ownerKind: "service_log", ownerId: londonLog }).find((a) => a.name === "valve plate.png")!;
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: londonLog }, multipart(PNG_1x1, "valve plate.png", "image/png"));
    expect(r.status).toBe(200);
    expect(r.attachment?.id).toBe(first.id);
  });

  it("refuses another site's file to a person limited to one site, and lets them not attach there", async () => {
    const osloTech = { ...tech, id: 2, siteIds: [w.oslo] };
    const londonFile = listOwnerAttachments(w.db, tech, { ownerKind: "service_log", ownerId: londonLog })[0]!;
    await expect(openAttachment(w.db, store, osloTech, londonFile.id)).rejects.toBeInstanceOf(AttachmentNotFound);
    expect(() => listOwnerAttachments(w.db, osloTech, { ownerKind: "service_log", ownerId: londonLog })).toThrow(AttachmentNotFound);
    await expect(
      uploadAttachment(w.db, store, osloTech, { ownerKind: "service_log", ownerId: londonLog }, multipart(PNG_1x1, "x.png", "image/png")),
    ).rejects.toBeInstanceOf(AttachmentNotFound);
    // Their own site's record is fine.
    const own = await uploadAttachment(w.db, store, osloTech, { ownerKind: "service_log", ownerId: osloLog }, multipart(PNG_1x1, "x.png", "image/png"));
    expect(own.status).toBe(201);
  });

  it("refuses a viewer by permission", async () => {
    const viewer = { ...tech, role: "viewer" as const };
    await expect(
      uploadAttachment(w.db, store, viewer, { ownerKind: "service_log", ownerId: londonLog }, multipart(PNG_1x1, "v.png", "image/png")),
    ).rejects.toMatchObject({ status: 403 });
  });

  it("records the failure on the entry when the store is down, and keeps the entry", async () => {
    const down = createObjectStore({ ...storageConfigFromEnv({ S3_BUCKET: "airkeep-test" }), endpoint: "http://127.0.0.1:1" });
    const r = await uploadAttachment(w.db, down, tech, { ownerKind: "service_log", ownerId: osloLog }, multipart(PDF, "sheet.pdf", "application/pdf"));
    down.close();
    expect(r.status).toBe(503);
    expect(r.attachment).toMatchObject({ status: "failed", name: "sheet.pdf" });
    expect(w.db.select().from(serviceLog).where(eq(serviceLog.id, osloLog)).get()).toBeTruthy();
  });

  it("records a cut-off upload as failed, with nothing in the store", async () => {
    const form = new FormData();
    form.append("file", new Blob([new Uint8Array(Buffer.concat([PNG_1x1, Buffer.alloc(100_000, 7)]))], { type: "image/png" }), "cut.png");
    const encoded = new Response(form);
    const type = encoded.headers.get("content-type")!;
    const full = Buffer.from(await encoded.arrayBuffer());
    const half = full.subarray(0, 60_000);
    let pulls = 0;
    // The client sends part of the form, then the connection drops.
    const body = new ReadableStream<Uint8Array>({
      async pull(c) {
        if (pulls++ === 0) c.enqueue(new Uint8Array(half));
        else {
          await new Promise((r) => setTimeout(r, 50));
          c.error(new Error("connection reset"));
        }
      },
    });
    const req = new Request("http://localhost/api/attachments", { method: "POST", body, headers: { "content-type": type }, duplex: "half" } as RequestInit);
    const before = storedObjects();
    const r = await uploadAttachment(w.db, store, tech, { ownerKind: "service_log", ownerId: osloLog }, req);
    expect(r).toMatchObject({ status: 400, reason: "truncated", attachment: { status: "failed", name: "cut.png" } });
    expect(storedObjects()).toBe(before);
  });

  it("writes a Content-Disposition that cannot break out of its quotes (RFC 6266)", () => {
    expect(contentDisposition('a"b\\c ü.pdf', true)).toBe(`inline; filename="a_b_c _.pdf"; filename*=UTF-8''a%22b%5Cc%20%C3%BC.pdf`);
  });

  /** Objects the fake keeps on disk (s3rver writes each as <key>._S3rver_object). */
  function storedObjects(): number {
    return (fs.readdirSync(tmp.file("files"), { recursive: true }) as string[]).filter((f) => f.endsWith("._S3rver_object")).length;
  }

  function auditCount(action: string): number {
    return w.db.select({ n: count() }).from(auditLog).where(eq(auditLog.action, action)).get()!.n;
  }
});
