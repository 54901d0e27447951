import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import WebSocket from "ws";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { createDeviceDirectory } from "@/lib/ingester/device-directory";
import { LiveBoard } from "@/lib/ingester/live-board";
import { startLiveHub, type LiveHub } from "@/lib/ingester/live-hub";
import { createLiveToken, type LiveTokenClaims } from "@/lib/live-token";

const SECRET = "live-revocation-test-secret-0123456789";
const ORIGIN = "http://localhost:3999";

let dir: string;
let db: Db;
let hub: LiveHub;
let directory: ReturnType<typeof createDeviceDirectory>;
const revokedLinks = new Set<number>();

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-live-revoke-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
  directory = createDeviceDirectory(db);
  hub = await startLiveHub({
    board: new LiveBoard([]),
    directory,
    port: 0,
    allowedOrigins: [ORIGIN],
    secret: SECRET,
    pingMs: 100,
    stillAllowed: (c: LiveTokenClaims) => c.displayLinkId == null || !revokedLinks.has(c.displayLinkId),
  });
});

afterAll(async () => {
  await hub.close();
  directory.close();
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

function connect(claims: { displayLinkId: number } | { userId: number }) {
  const token = createLiveToken({ ...claims, siteIds: null }, SECRET);
  const ws = new WebSocket(`ws://127.0.0.1:${hub.port}/live?token=${encodeURIComponent(token)}`, { headers: { origin: ORIGIN } });
  const closed = new Promise<number>((resolve) => ws.on("close", (code) => resolve(code)));
  const opened = new Promise<void>((resolve, reject) => {
    ws.once("message", () => resolve());
    ws.once("error", reject);
  });
  return { ws, opened, closed };
}

describe("live hub after access is revoked", () => {
  it("closes a display link's open socket at the next ping once the link is revoked, and keeps others open", async () => {
    const kiosk = connect({ displayLinkId: 7 });
    const person = connect({ userId: 1 });
    await Promise.all([kiosk.opened, person.opened]);
    revokedLinks.add(7);
    expect(await kiosk.closed).toBe(4003);
    expect(hub.stats().closedRevoked).toBe(1);
    expect(person.ws.readyState).toBe(WebSocket.OPEN);
    person.ws.close();
    await person.closed;
  });
});
