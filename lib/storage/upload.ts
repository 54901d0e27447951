import { createHash, randomUUID } from "node:crypto";
import { Readable } from "node:stream";
import type { ReadableStream as NodeWebReadableStream } from "node:stream/web";
import busboy from "busboy";
import { fileTypeFromBuffer } from "file-type";
import { attachmentTypes, MAX_ATTACHMENT_BYTES, sanitizeFileName, type UploadRejection } from "@/shared/attachment-schema";
import type { ObjectStore } from "./object-store";

// Receives one file from a multipart/form-data request and streams it into the object store: the type is sniffed from
// the first bytes, the size limit holds while streaming, and nothing but one store part (5 MB) is ever held in memory.

export type StoredFile = {
  key: string;
  name: string;
  /** The file name had to be cleaned (path segments, control characters, length). */
  nameChanged: boolean;
  contentType: string;
  size: number;
  sha256: string;
};

export type UploadOutcome =
  | { ok: true; file: StoredFile }
  | { ok: false; reason: UploadRejection; name: string | null; detail?: string };

export class UploadRefused extends Error {
  constructor(readonly reason: UploadRejection) {
    super(reason);
  }
}

/** file-type's advice: 4100 bytes are enough to tell every type it knows. */
const SNIFF_BYTES = 4100;
const MAX_CONCURRENT_UPLOADS = 4;
let running = 0;

export function uploadsRunning(): number {
  return running;
}

/** Reads the head of a stream (up to n bytes, or all of it if shorter) and returns it with an iterator for the rest. */
async function readHead(it: AsyncIterator<Buffer>, n: number): Promise<{ head: Buffer; done: boolean }> {
  const chunks: Buffer[] = [];
  let len = 0;
  while (len < n) {
    const r = await it.next();
    if (r.done) return { head: Buffer.concat(chunks), done: true };
    chunks.push(r.value);
    len += r.value.length;
  }
  return { head: Buffer.concat(chunks), done: false };
}

export async function receiveUpload(
  request: Request,
  store: ObjectStore,
  opts: { keyPrefix: string; maxBytes?: number },
): Promise<UploadOutcome> {
  const maxBytes = opts.maxBytes ?? MAX_ATTACHMENT_BYTES;
  const contentType = request.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data;/i.test(contentType) || !request.body) return { ok: false, reason: "not-multipart", name: null };
  // Far too big by its own declaration: refuse before reading (multipart framing adds well under 64 KiB).
  const declared = Number(request.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes + 64 * 1024) return { ok: false, reason: "oversize", name: null };
  // Checked and taken before the first await, so concurrent requests cannot all pass the check.
  if (running >= MAX_CONCURRENT_UPLOADS) return { ok: false, reason: "busy", name: null };
  running++;
  try {
    return await receive(request.body, contentType, store, opts.keyPrefix, maxBytes);
  } finally {
    running--;
  }
}

async function receive(
  body: ReadableStream<Uint8Array>,
  contentType: string,
  store: ObjectStore,
  keyPrefix: string,
  maxBytes: number,
): Promise<UploadOutcome> {
  let bb: busboy.Busboy;
  try {
    bb = busboy({ headers: { "content-type": contentType }, defParamCharset: "utf8", limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 4096 } });
  } catch {
    return { ok: false, reason: "not-multipart", name: null };
  }
  const source = Readable.fromWeb(body as unknown as NodeWebReadableStream<Uint8Array>);
  // Set from event handlers; kept in one object so the checks below read them as they are then.
  const st: { clientFailed: boolean; sourceFailed: boolean; tooMany: boolean; name: string | null; work: Promise<UploadOutcome> | null; parseError: Error | null } = {
    clientFailed: false,
    sourceFailed: false,
    tooMany: false,
    name: null,
    work: null,
    parseError: null,
  };

  const parsed = new Promise<void>((resolve, reject) => {
    bb.on("close", () => resolve());
    bb.on("error", (e) => {
      st.clientFailed = true;
      reject(e as Error);
    });
  });
  source.on("error", (e) => {
    st.clientFailed = true;
    st.sourceFailed = true;
    bb.destroy(e);
  });
  bb.on("filesLimit", () => {
    st.tooMany = true;
  });
  bb.on("file", (_field, file, info) => {
    if (st.work) {
      file.resume();
      return;
    }
    const cleaned = sanitizeFileName(info.filename ?? "");
    st.name = cleaned.name;
    const it = file[Symbol.asyncIterator]() as AsyncIterator<Buffer>;
    st.work = storeOne(file, it, cleaned, store, keyPrefix).catch(async (e: unknown) => {
      // Read the rest of the part and let it go, so the form is parsed to its end and the client gets its answer.
      await drain(it);
      const reason: UploadRejection = e instanceof UploadRefused ? e.reason : st.clientFailed || file.errored ? "truncated" : "store-down";
      return { ok: false as const, reason, name: cleaned.name, detail: e instanceof UploadRefused ? undefined : (e as Error).message };
    });
  });
  source.pipe(bb);

  await parsed.catch((e: Error) => {
    st.parseError = e;
  });
  const outcome: UploadOutcome = st.work ? await st.work : { ok: false, reason: st.clientFailed && !st.parseError ? "truncated" : st.parseError ? (st.sourceFailed ? "truncated" : "malformed") : "no-file", name: null };
  if (outcome.ok && (st.parseError || st.tooMany)) {
    // The form was cut off after the file, or carried a second file: keep nothing.
    await store.remove(outcome.file.key).catch(() => undefined);
    return { ok: false, reason: st.tooMany ? "too-many" : "truncated", name: st.name };
  }
  if (!outcome.ok && st.parseError && outcome.reason === "store-down") return { ...outcome, reason: "truncated" };
  return outcome;
}

async function drain(it: AsyncIterator<Buffer>): Promise<void> {
  try {
    for (let r = await it.next(); !r.done; r = await it.next());
  } catch {
    // the request itself failed; nothing left to read
  }
}

async function storeOne(
  file: Readable & { truncated?: boolean },
  it: AsyncIterator<Buffer>,
  cleaned: { name: string; changed: boolean },
  store: ObjectStore,
  keyPrefix: string,
): Promise<UploadOutcome> {
  const { head, done } = await readHead(it, SNIFF_BYTES);
  if (head.length === 0) throw new UploadRefused(file.truncated ? "oversize" : "empty");
  const sniffed = await fileTypeFromBuffer(head);
  const ext = sniffed ? attachmentTypes[sniffed.mime] : undefined;
  if (!sniffed || !ext) throw new UploadRefused("type");

  const hash = createHash("sha256");
  let size = 0;
  const counted = Readable.from(
    (async function* () {
      hash.update(head);
      size += head.length;
      yield head;
      if (!done) {
        for (let r = await it.next(); !r.done; r = await it.next()) {
          hash.update(r.value);
          size += r.value.length;
          yield r.value;
        }
      }
      // busboy stops at the size limit and marks the stream truncated.
      if (file.truncated) throw new UploadRefused("oversize");
    })(),
  );
  const now = new Date();
  const key = `${keyPrefix}/${now.getUTCFullYear()}/${String(now.getUTCMonth() + 1).padStart(2, "0")}/${randomUUID()}.${ext}`;
  try {
    await store.put(key, counted, sniffed.mime);
  } catch (e) {
    counted.destroy();
    await store.remove(key).catch(() => undefined);
    // An error raised while reading the body (size limit, cut-off client) wins over what the store reported.
    const cause = (e as { cause?: unknown }).cause;
    if (e instanceof UploadRefused) throw e;
    if (cause instanceof UploadRefused) throw cause;
    if (file.truncated) throw new UploadRefused("oversize");
    throw e;
  }
  if (file.truncated) {
    await store.remove(key).catch(() => undefined);
    throw new UploadRefused("oversize");
  }
  return { ok: true, file: { key, name: cleaned.name, nameChanged: cleaned.changed, contentType: sniffed.mime, size, sha256: hash.digest("hex") } };
}
