import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import WebSocket from "ws";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { revokeSession, createSession } from "@/db/sessions";
import { createDeviceDirectory } from "@/lib/ingester/device-directory";
import { liveAccessCheck } from "@/lib/ingester/live-access";
import { LiveBoard } from "@/lib/ingester/live-board";
import { startLiveHub, type LiveHub } from "@/lib/ingester/live-hub";
import { createLiveToken } from "@/lib/live-token";

const SECRET = "live-revocation-test-secret-0123456789";
const ORIGIN = "http://localhost:3999";

let dir: string;
let db: Db;
let hub: LiveHub;
let directory: ReturnType<typeof createDeviceDirectory>;

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-live-revoke-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
  const now = Date.now();
  const user = db.$client.prepare(
    "INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, '-', 'supervisor', 1, ?, ?)",
  );
  user.run("ana@airkeep.demo", "Ana", now, now);
  user.run("ben@airkeep.demo", "Ben", now, now);
  db.$client.prepare("INSERT INTO display_links (token_hash, label, created_by, created_at) VALUES ('h7', 'Bay screen', 1, ?)").run(now);
  createSession(db, { id: "session-ana", userId: 1, ip: "127.0.0.1" });
  createSession(db, { id: "session-ana-phone", userId: 1, ip: "127.0.0.1" });
  createSession(db, { id: "session-ben", userId: 2, ip: "127.0.0.1" });
  directory = createDeviceDirectory(db);
  hub = await startLiveHub({
    board: new LiveBoard([]),
    directory,
    port: 0,
    allowedOrigins: [ORIGIN],
    secret: SECRET,
    pingMs: 100,
    stillAllowed: liveAccessCheck(db),
  });
});

afterAll(async () => {
  await hub.close();
  directory.close();
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

function connect(claims: { displayLinkId: number } | { userId: number; sessionId?: string }) {
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
  it("closes each open socket at the next ping once its access ends, and keeps the others open", async () => {
    const kiosk = connect({ displayLinkId: 1 });
    const ana = connect({ userId: 1, sessionId: "session-ana" });
    const anaPhone = connect({ userId: 1, sessionId: "session-ana-phone" });
    const ben = connect({ userId: 2, sessionId: "session-ben" });
    await Promise.all([kiosk.opened, ana.opened, anaPhone.opened, ben.opened]);

    // The display link is revoked by an admin.
    db.$client.prepare("UPDATE display_links SET revoked_at = ? WHERE id = 1").run(Date.now());
    expect(await kiosk.closed).toBe(4003);
    expect(hub.stats().closedRevoked).toBe(1);

    // Ana signs out on one device: that session's socket ends, her other session's stays.
    revokeSession(db, "session-ana");
    expect(await ana.closed).toBe(4003);
    await new Promise((r) => setTimeout(r, 300));
    expect(anaPhone.ws.readyState).toBe(WebSocket.OPEN);

    // Ben's account is disabled.
    db.$client.prepare("UPDATE users SET disabled = 1 WHERE id = 2").run();
    expect(await ben.closed).toBe(4003);
    expect(hub.stats().closedRevoked).toBe(3);
    expect(anaPhone.ws.readyState).toBe(WebSocket.OPEN);
    anaPhone.ws.close();
    await anaPhone.closed;
  });

  it("does not let a token name a session of someone else", () => {
    const allowed = liveAccessCheck(db);
    const claims = { displayLinkId: null, siteIds: null, issuedAt: 0, expiresAt: 0 };
    expect(allowed({ ...claims, userId: 1, sessionId: "session-ana-phone" })).toBe(true);
    expect(allowed({ ...claims, userId: 1, sessionId: "session-ben" })).toBe(false);
    expect(allowed({ ...claims, userId: 1, sessionId: "no-such-session" })).toBe(false);
  });
});
