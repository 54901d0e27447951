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
import { type LiveMessage, liveMessageSchema } from "@/shared/live";
import { waitFor } from "./ingest-fixtures";

const SECRET = "live-revocation-test-secret-0123456789";
const ORIGIN = "http://localhost:3999";
// Long enough that a loaded test machine still answers each ping before the next one (a missed pong ends the socket).
const PING_MS = 250;
const LIMITS = { idleMs: 10 * 60_000, absoluteMs: 60 * 60_000 };

let dir: string;
let db: Db;
let hub: LiveHub;
let directory: ReturnType<typeof createDeviceDirectory>;
const site = { north: 0, south: 0 };
const compressor = { north: 0, south: 0 };

const sql = (text: string, ...params: unknown[]) => db.$client.prepare(text).run(...params);

function addUser(email: string, role = "supervisor"): number {
  const now = Date.now();
  return Number(
    sql("INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, '-', ?, 1, ?, ?)", email, email, role, now, now)
      .lastInsertRowid,
  );
}

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-live-revoke-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
  const now = Date.now();
  addUser("ana@airkeep.demo"); // 1
  addUser("ben@airkeep.demo"); // 2
  sql("INSERT INTO display_links (token_hash, label, created_by, created_at) VALUES ('h7', 'Bay screen', 1, ?)", now);
  createSession(db, { id: "session-ana", userId: 1, ip: "127.0.0.1" });
  createSession(db, { id: "session-ana-phone", userId: 1, ip: "127.0.0.1" });
  createSession(db, { id: "session-ben", userId: 2, ip: "127.0.0.1" });
  site.north = Number(sql("INSERT INTO sites (name, code, time_zone, created_at) VALUES ('North', 'north', 'UTC', ?)", now).lastInsertRowid);
  site.south = Number(sql("INSERT INTO sites (name, code, time_zone, created_at) VALUES ('South', 'south', 'UTC', ?)", now).lastInsertRowid);
  const model = sql(
    "INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('T', 4, 300, 330, ?)",
    now,
  ).lastInsertRowid;
  const addCompressor = (siteId: number, deviceId: string) =>
    Number(
      sql(
        `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
         VALUES (?, ?, ?, ?, ?, 300, 270, ?, ?)`,
        siteId,
        model,
        deviceId,
        `SN-${deviceId}`,
        deviceId,
        now,
        now,
      ).lastInsertRowid,
    );
  compressor.north = addCompressor(site.north, "n-1");
  compressor.south = addCompressor(site.south, "s-1");
  directory = createDeviceDirectory(db);
  hub = await startLiveHub({
    board: new LiveBoard([]),
    directory,
    port: 0,
    allowedOrigins: [ORIGIN],
    secret: SECRET,
    pingMs: PING_MS,
    coalesceMs: 0,
    access: liveAccessCheck(db, LIMITS),
  });
});

afterAll(async () => {
  await hub.close();
  directory.close();
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

type Claims = { displayLinkId: number } | { userId: number; sessionId?: string };

/** Opens a socket; `result` is "open" once the snapshot arrives, or the HTTP status the upgrade was refused with. */
function connect(claims: Claims, siteIds: number[] | null = null) {
  const token = createLiveToken({ ...claims, siteIds } as Parameters<typeof createLiveToken>[0], SECRET);
  const ws = new WebSocket(`ws://127.0.0.1:${hub.port}/live?token=${encodeURIComponent(token)}`, { headers: { origin: ORIGIN } });
  const messages: LiveMessage[] = [];
  ws.on("message", (data) => messages.push(liveMessageSchema.parse(JSON.parse(String(data)))));
  const closed = new Promise<number>((resolve) => ws.on("close", (code) => resolve(code)));
  const result = new Promise<"open" | number>((resolve, reject) => {
    ws.once("message", () => resolve("open"));
    ws.once("unexpected-response", (_req, res) => resolve(res.statusCode ?? 0));
    ws.once("error", reject);
  });
  return { ws, messages, result, closed };
}

const opened = async (c: ReturnType<typeof connect>) => expect(await c.result).toBe("open");

const snapshotIds = (m: LiveMessage | undefined) => (m?.type === "snapshot" ? m.compressors.map((c) => c.compressorId).sort() : null);
const updatesFor = (messages: LiveMessage[], id: number) =>
  messages.filter((m) => m.type === "update" && m.compressor.compressorId === id).length;

describe("live hub after access is revoked", () => {
  it("closes each open socket at the next ping once its access ends, and keeps the others open", async () => {
    const kiosk = connect({ displayLinkId: 1 });
    const ana = connect({ userId: 1, sessionId: "session-ana" });
    const anaPhone = connect({ userId: 1, sessionId: "session-ana-phone" });
    const ben = connect({ userId: 2, sessionId: "session-ben" });
    for (const c of [kiosk, ana, anaPhone, ben]) await opened(c);
    const before = hub.stats().closedRevoked;

    // The display link is revoked by an admin.
    sql("UPDATE display_links SET revoked_at = ? WHERE id = 1", Date.now());
    expect(await kiosk.closed).toBe(4003);
    expect(hub.stats().closedRevoked - before).toBe(1);

    // Ana signs out on one device: that session's socket ends, her other session's stays.
    revokeSession(db, "session-ana");
    expect(await ana.closed).toBe(4003);
    await new Promise((r) => setTimeout(r, 3 * PING_MS));
    expect(anaPhone.ws.readyState).toBe(WebSocket.OPEN);

    // Ben's account is disabled.
    sql("UPDATE users SET disabled = 1 WHERE id = 2");
    expect(await ben.closed).toBe(4003);
    expect(hub.stats().closedRevoked - before).toBe(3);
    expect(anaPhone.ws.readyState).toBe(WebSocket.OPEN);
    anaPhone.ws.close();
    await anaPhone.closed;
  });

  it("does not let a token name a session of someone else", () => {
    const allowed = liveAccessCheck(db, LIMITS);
    const claims = { displayLinkId: null, siteIds: null, issuedAt: 0, expiresAt: 0 };
    expect(allowed({ ...claims, userId: 1, sessionId: "session-ana-phone" }).ok).toBe(true);
    expect(allowed({ ...claims, userId: 1, sessionId: "session-ben" })).toEqual({ ok: false, reason: "signed-out" });
    expect(allowed({ ...claims, userId: 1, sessionId: "no-such-session" })).toEqual({ ok: false, reason: "signed-out" });
    expect(allowed({ ...claims, userId: 1, sessionId: null })).toEqual({ ok: false, reason: "no-session" });
  });
});

describe("live hub at the upgrade", () => {
  it("refuses a well-signed, unexpired token whose session, account or display link no longer gives access", async () => {
    const now = Date.now();
    const cara = addUser("cara@airkeep.demo");
    createSession(db, { id: "cara-signed-out", userId: cara, ip: "127.0.0.1" });
    revokeSession(db, "cara-signed-out");
    createSession(db, { id: "cara-idle", userId: cara, ip: "127.0.0.1" }, now - 2 * LIMITS.idleMs);
    // Used a minute ago, but signed in longer ago than the absolute limit.
    createSession(db, { id: "cara-old", userId: cara, ip: "127.0.0.1" }, now - LIMITS.absoluteMs - 60_000);
    sql("UPDATE user_sessions SET last_seen_at = ? WHERE id = 'cara-old'", now - 60_000);
    createSession(db, { id: "cara-ok", userId: cara, ip: "127.0.0.1" });
    const dan = addUser("dan@airkeep.demo");
    createSession(db, { id: "dan-ok", userId: dan, ip: "127.0.0.1" });
    sql("UPDATE users SET disabled = 1 WHERE id = ?", dan);
    const link = Number(sql("INSERT INTO display_links (token_hash, label, created_by, created_at, revoked_at) VALUES ('h8', 'Old screen', 1, ?, ?)", now, now).lastInsertRowid);

    const before = hub.stats();
    const refused = [
      connect({ userId: cara, sessionId: "cara-signed-out" }),
      connect({ userId: cara, sessionId: "cara-idle" }),
      connect({ userId: cara, sessionId: "cara-old" }),
      connect({ userId: cara }),
      connect({ userId: dan, sessionId: "dan-ok" }),
      connect({ displayLinkId: link }),
      connect({ displayLinkId: 999 }),
    ];
    for (const c of refused) expect(await c.result).toBe(401);
    const good = connect({ userId: cara, sessionId: "cara-ok" });
    await opened(good);
    const after = hub.stats();
    expect(after.refusedAccess - before.refusedAccess).toBe(refused.length);
    expect(after.accepted - before.accepted).toBe(1);
    expect(after.refusedToken).toBe(before.refusedToken);
    good.ws.close();
    await good.closed;
  });
});

describe("live hub session limits and site scope at each ping", () => {
  it("closes a socket at the first ping after its session goes idle or passes its absolute lifetime", async () => {
    const eve = addUser("eve@airkeep.demo");
    createSession(db, { id: "eve-a", userId: eve, ip: "127.0.0.1" });
    createSession(db, { id: "eve-b", userId: eve, ip: "127.0.0.1" });
    createSession(db, { id: "eve-c", userId: eve, ip: "127.0.0.1" });
    const a = connect({ userId: eve, sessionId: "eve-a" });
    const b = connect({ userId: eve, sessionId: "eve-b" });
    const c = connect({ userId: eve, sessionId: "eve-c" });
    for (const x of [a, b, c]) await opened(x);
    const now = Date.now();
    sql("UPDATE user_sessions SET last_seen_at = ? WHERE id = 'eve-a'", now - LIMITS.idleMs - 1_000);
    sql("UPDATE user_sessions SET created_at = ? WHERE id = 'eve-b'", now - LIMITS.absoluteMs - 1_000);
    expect(await a.closed).toBe(4003);
    expect(await b.closed).toBe(4003);
    // The open socket is not use of the session: its last-seen time stays where the web requests left it.
    expect(db.$client.prepare("SELECT last_seen_at FROM user_sessions WHERE id = 'eve-c'").pluck().get()).toBeLessThanOrEqual(now);
    expect(c.ws.readyState).toBe(WebSocket.OPEN);
    c.ws.close();
    await c.closed;
  });

  it("stops another site's values within one ping of the person's sites being narrowed, and widens again", async () => {
    const finn = addUser("finn@airkeep.demo");
    createSession(db, { id: "finn", userId: finn, ip: "127.0.0.1" });
    sql("UPDATE users SET all_sites = 0 WHERE id = ?", finn);
    sql("INSERT INTO user_sites (user_id, site_id) VALUES (?, ?), (?, ?)", finn, site.north, finn, site.south);
    // The token still names both sites when it is used; the hub goes by the account from now on.
    const s = connect({ userId: finn, sessionId: "finn" }, [site.north, site.south]);
    await opened(s);
    expect(snapshotIds(s.messages[0])).toEqual([compressor.north, compressor.south].sort());
    hub.notify(compressor.south);
    await waitFor(() => updatesFor(s.messages, compressor.south) === 1, 2_000, "south update before narrowing");

    const before = hub.stats().rescoped;
    const mark = s.messages.length;
    sql("DELETE FROM user_sites WHERE user_id = ? AND site_id = ?", finn, site.south);
    const snap = await waitFor(() => s.messages.slice(mark).find((m) => m.type === "snapshot"), 2_000, "snapshot in the narrowed scope");
    // At the first ping after the change: the new snapshot goes out before that ping's own message.
    const after = s.messages.slice(mark);
    const firstPing = after.findIndex((m) => m.type === "ping");
    expect(firstPing === -1 || after.indexOf(snap) < firstPing).toBe(true);
    expect(snapshotIds(snap)).toEqual([compressor.north]);
    expect(hub.stats().rescoped - before).toBe(1);

    hub.notify(compressor.south);
    hub.notify(compressor.north);
    await waitFor(() => updatesFor(s.messages, compressor.north) === 1, 2_000, "north update after narrowing");
    await new Promise((r) => setTimeout(r, 3 * PING_MS));
    expect(updatesFor(s.messages, compressor.south)).toBe(1);
    expect(s.ws.readyState).toBe(WebSocket.OPEN);

    // Marking the account every-site widens it again (as for the web pages).
    sql("UPDATE users SET all_sites = 1 WHERE id = ?", finn);
    const wide = await waitFor(() => s.messages.filter((m) => m.type === "snapshot")[2], 2_000, "snapshot in the widened scope");
    expect(snapshotIds(wide)).toEqual([compressor.north, compressor.south].sort());
    s.ws.close();
    await s.closed;
  });

  it("uses a display link's own sites, not the token's", async () => {
    const now = Date.now();
    const link = Number(
      sql("INSERT INTO display_links (token_hash, label, site_ids, created_by, created_at) VALUES ('h9', 'North bay', ?, 1, ?)", JSON.stringify([site.north]), now)
        .lastInsertRowid,
    );
    const s = connect({ displayLinkId: link }, null);
    await opened(s);
    expect(snapshotIds(s.messages[0])).toEqual([compressor.north]);
    s.ws.close();
    await s.closed;
  });
});
