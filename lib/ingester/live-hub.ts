import http from "node:http";
import type net from "node:net";
import { WebSocket, WebSocketServer } from "ws";
import { type LiveTokenClaims, verifyLiveToken } from "@/lib/live-token";
import type { LiveMessage } from "@/shared/live";
import type { DeviceDirectory } from "./device-directory";
import type { LiveAccessCheck } from "./live-access";
import type { LiveBoard } from "./live-board";

export type LiveHubOptions = {
  board: LiveBoard;
  directory: DeviceDirectory;
  /** Default 127.0.0.1. */
  host?: string;
  /** 0 picks a free port. */
  port: number;
  /** Exact Origin header values a browser may connect from. */
  allowedOrigins: readonly string[];
  /** HMAC secret of the live tokens; default NEXTAUTH_SECRET. */
  secret?: string;
  /** At most one update per compressor per this many ms. */
  coalesceMs?: number;
  pingMs?: number;
  /** The connection is closed (code 4001) after this long, so a revoked user or display link drops off. */
  maxConnectionMs?: number;
  /**
   * Asked before a socket opens (a refusal answers 401) and for every open socket at each ping (a refusal closes it
   * with code 4003); the sites it returns replace the token's, so a narrowed scope applies from the next ping.
   * Without it the token alone decides, for its lifetime.
   */
  access?: LiveAccessCheck;
  maxClients?: number;
  /** A client this far behind is dropped; it reconnects and gets a fresh snapshot. */
  maxBufferedBytes?: number;
  log?: (msg: string) => void;
};

export type LiveHubStats = {
  clients: number;
  accepted: number;
  refusedToken: number;
  refusedOrigin: number;
  refusedFull: number;
  /** Upgrades refused although the token was good: its session, account or display link no longer gives access. */
  refusedAccess: number;
  /** Open connections closed because their user or display link lost access. */
  closedRevoked: number;
  /** Open connections whose sites changed at a ping (they got a fresh snapshot in the new scope). */
  rescoped: number;
  droppedSlow: number;
  updatesSent: number;
};

export type LiveHub = {
  port: number;
  /** The compressor's live state changed; clients in scope get an update (coalesced). */
  notify(compressorId: number): void;
  stats(): LiveHubStats;
  close(): Promise<void>;
};

type Conn = { ws: WebSocket; claims: LiveTokenClaims; sites: Set<number> | null; alive: boolean; lifetime: NodeJS.Timeout };

const toScope = (siteIds: readonly number[] | null): Set<number> | null => (siteIds ? new Set(siteIds) : null);

function sameScope(a: Set<number> | null, b: Set<number> | null): boolean {
  if (a === null || b === null) return a === b;
  return a.size === b.size && [...a].every((x) => b.has(x));
}

export function defaultAllowedOrigins(env: Record<string, string | undefined> = process.env): string[] {
  const explicit = env.LIVE_ALLOWED_ORIGINS?.split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  if (explicit?.length) return explicit;
  let url: URL;
  try {
    url = new URL(env.NEXTAUTH_URL ?? "http://localhost:3000");
  } catch {
    url = new URL("http://localhost:3000");
  }
  // A page opened at 127.0.0.1 or [::1] is the same loopback server as one opened at localhost.
  if (!LOOPBACK_HOSTS.includes(url.hostname)) return [url.origin];
  return LOOPBACK_HOSTS.map((host) => {
    const u = new URL(url.origin);
    u.hostname = host;
    return u.origin;
  });
}

const LOOPBACK_HOSTS = ["localhost", "127.0.0.1", "[::1]"];

function refuse(socket: net.Socket, status: number, text: string): void {
  socket.end(`HTTP/1.1 ${status} ${text}\r\nConnection: close\r\nContent-Type: text/plain\r\nContent-Length: ${text.length}\r\n\r\n${text}`);
  socket.destroySoon?.();
}

export async function startLiveHub(opts: LiveHubOptions): Promise<LiveHub> {
  const { board, directory } = opts;
  const log = opts.log ?? ((m: string) => console.log(`[live] ${m}`));
  const coalesceMs = opts.coalesceMs ?? 250;
  const maxBuffered = opts.maxBufferedBytes ?? 4 * 1024 * 1024;
  const maxClients = opts.maxClients ?? 2_000;
  const maxConnectionMs = opts.maxConnectionMs ?? 3_600_000;
  const allowed = new Set(opts.allowedOrigins);
  const conns = new Set<Conn>();
  const s: Omit<LiveHubStats, "clients"> = {
    accepted: 0,
    refusedToken: 0,
    refusedOrigin: 0,
    refusedFull: 0,
    refusedAccess: 0,
    closedRevoked: 0,
    rescoped: 0,
    droppedSlow: 0,
    updatesSent: 0,
  };

  const server = http.createServer((_req, res) => {
    res.writeHead(426, { "content-type": "text/plain", connection: "close" }).end("WebSocket only\n");
  });
  const wss = new WebSocketServer({ noServer: true, maxPayload: 1024, perMessageDeflate: false });

  const inScope = (c: Conn, compressorId: number): boolean => {
    if (!c.sites) return true;
    const siteId = directory.byCompressorId(compressorId)?.siteId;
    return siteId !== undefined && c.sites.has(siteId);
  };

  const sendSnapshot = (c: Conn): void => {
    const now = Date.now();
    const compressors = directory
      .all()
      .filter((d) => inScope(c, d.compressorId))
      .map((d) => board.live(d.compressorId, now));
    send(c, JSON.stringify({ type: "snapshot", at: now, compressors } satisfies LiveMessage));
  };

  const send = (c: Conn, data: string): void => {
    if (c.ws.readyState !== WebSocket.OPEN) return;
    if (c.ws.bufferedAmount > maxBuffered) {
      s.droppedSlow++;
      c.ws.terminate();
      return;
    }
    c.ws.send(data);
  };

  server.on("upgrade", (req: http.IncomingMessage, socket: net.Socket, head: Buffer) => {
    socket.on("error", () => {});
    const origin = req.headers.origin;
    if (!origin || !allowed.has(origin)) {
      s.refusedOrigin++;
      return refuse(socket, 403, "Forbidden");
    }
    let token: string | null = null;
    try {
      token = new URL(req.url ?? "/", "http://localhost").searchParams.get("token");
    } catch {
      token = null;
    }
    const claims = verifyLiveToken(token, opts.secret ?? process.env.NEXTAUTH_SECRET);
    if (!claims) {
      s.refusedToken++;
      return refuse(socket, 401, "Unauthorized");
    }
    // A good signature only says the token was issued; whether its session, account or link still counts is asked now.
    const access = opts.access?.(claims) ?? { ok: true as const, siteIds: claims.siteIds };
    if (!access.ok) {
      s.refusedAccess++;
      return refuse(socket, 401, "Unauthorized");
    }
    if (conns.size >= maxClients) {
      s.refusedFull++;
      return refuse(socket, 503, "Service Unavailable");
    }
    wss.handleUpgrade(req, socket, head, (ws) => {
      s.accepted++;
      const c: Conn = {
        ws,
        claims,
        sites: toScope(access.siteIds),
        alive: true,
        lifetime: setTimeout(() => ws.close(4001, "token lifetime over: reconnect"), maxConnectionMs),
      };
      conns.add(c);
      ws.on("pong", () => {
        c.alive = true;
      });
      ws.on("error", () => {});
      ws.on("close", () => {
        clearTimeout(c.lifetime);
        conns.delete(c);
      });
      sendSnapshot(c);
    });
  });

  const pingTimer = setInterval(() => {
    const data = JSON.stringify({ type: "ping", at: Date.now() } satisfies LiveMessage);
    for (const c of conns) {
      // Closing already (its close handshake still under way): judged and counted once.
      if (c.ws.readyState !== WebSocket.OPEN) continue;
      if (!c.alive) {
        c.ws.terminate();
        continue;
      }
      const access = opts.access?.(c.claims);
      if (access && !access.ok) {
        s.closedRevoked++;
        c.ws.close(4003, `access ended: ${access.reason}`);
        continue;
      }
      if (access && !sameScope(c.sites, toScope(access.siteIds))) {
        // Sites narrowed or widened since the token: from now on only the new scope, starting with its snapshot.
        s.rescoped++;
        c.sites = toScope(access.siteIds);
        sendSnapshot(c);
      }
      c.alive = false;
      c.ws.ping();
      send(c, data);
    }
  }, opts.pingMs ?? 20_000);
  pingTimer.unref();

  const lastSent = new Map<number, number>();
  const scheduled = new Map<number, NodeJS.Timeout>();
  const sendUpdate = (compressorId: number): void => {
    scheduled.delete(compressorId);
    const now = Date.now();
    lastSent.set(compressorId, now);
    if (conns.size === 0) return;
    let data: string | null = null;
    for (const c of conns) {
      if (!inScope(c, compressorId)) continue;
      data ??= JSON.stringify({ type: "update", at: now, compressor: board.live(compressorId, now) } satisfies LiveMessage);
      send(c, data);
      s.updatesSent++;
    }
  };

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host ?? "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as net.AddressInfo).port;
  log(`live WebSocket on ${opts.host ?? "127.0.0.1"}:${port}`);

  return {
    port,
    notify(compressorId) {
      if (scheduled.has(compressorId)) return;
      const wait = (lastSent.get(compressorId) ?? 0) + coalesceMs - Date.now();
      if (wait <= 0) sendUpdate(compressorId);
      else scheduled.set(compressorId, setTimeout(sendUpdate, wait, compressorId));
    },
    stats: () => ({ clients: conns.size, ...s }),
    async close() {
      clearInterval(pingTimer);
      for (const t of scheduled.values()) clearTimeout(t);
      scheduled.clear();
      for (const c of conns) {
        clearTimeout(c.lifetime);
        c.ws.close(1001, "server shutting down");
      }
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        setTimeout(() => {
          for (const c of conns) c.ws.terminate();
        }, 1_000).unref();
      });
      wss.close();
    },
  };
}
