// The web side of the service benchmark's upload test, as its own process so its memory can be watched: the same
// upload and download code the route handlers call (lib/storage/attachments.ts), behind a bare HTTP server.
// Started by lib/bench/service.ts with BENCH_DB, S3_URL-style settings in the environment; prints its port.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { Readable } from "node:stream";
import { openDatabase } from "@/db/client";
import { openAttachment, uploadAttachment } from "@/lib/storage/attachments";
import { storageConfigFromEnv } from "@/lib/storage/config";
import { createObjectStore } from "@/lib/storage/object-store";

const db = openDatabase(process.env.BENCH_DB!);
const store = createObjectStore({ ...storageConfigFromEnv(), endpoint: process.env.BENCH_S3!, bucket: "airkeep-bench" });
const user = { id: 1, name: "Bench", email: "bench@airkeep.demo", role: "technician" as const, siteIds: null };

const server = http.createServer(async (req, res) => {
  try {
    const url = new URL(req.url ?? "/", "http://localhost");
    if (req.method === "POST" && url.pathname === "/upload") {
      const request = new Request(url, {
        method: "POST",
        headers: req.headers as Record<string, string>,
        body: Readable.toWeb(req) as unknown as ReadableStream<Uint8Array>,
        duplex: "half",
      } as RequestInit);
      const r = await uploadAttachment(db, store, user, { ownerKind: "service_log", ownerId: Number(url.searchParams.get("ownerId")) }, request);
      res.writeHead(r.status, { "content-type": "application/json" }).end(JSON.stringify(r));
      return;
    }
    const m = /^\/download\/(\d+)$/.exec(url.pathname);
    if (req.method === "GET" && m) {
      const { attachment, body } = await openAttachment(db, store, user, Number(m[1]));
      res.writeHead(200, { "content-type": attachment.contentType, "content-length": String(attachment.size) });
      Readable.fromWeb(body as unknown as import("node:stream/web").ReadableStream<Uint8Array>).pipe(res);
      return;
    }
    res.writeHead(404).end();
  } catch (e) {
    res.writeHead(500).end(String(e));
  }
});
server.listen(0, "127.0.0.1", () => console.log(`PORT ${(server.address() as AddressInfo).port}`));
