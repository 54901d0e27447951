import type { EventEmitter } from "node:events";
import net from "node:net";
import { Aedes, type Client } from "aedes";
import type { Db } from "@/db/client";
import { writeServiceStatus } from "@/db/telemetry-state";
import { channels, parseTopic, TOPIC_ROOT } from "@/shared/telemetry";
import { createAuditLimiter } from "./audit-limiter";
import { createCredentialChecker, type DeviceIdentity, type Identity } from "./credentials";
import { type GuardLimits, guardSocket, type PacketGuard } from "./packet-guard";
import { FastMemoryPersistence } from "./persistence";
import { openQueueFile, queueFilePath } from "./queue-file";
import { INGEST_CLIENT_ID, INGEST_TOPIC, ingestPassword as defaultIngestPassword, RESERVED_CLIENT_ID_PREFIX } from "./ingest-credential";

/** The broker refuses (acknowledges and drops) larger payloads; the ingester applies the tighter contract limit. */
const BROKER_MAX_PAYLOAD = 64 * 1024;
/** Refused publishes within a minute on one connection beyond which the connection is closed. */
const REFUSALS_BEFORE_DISCONNECT = 30;
const ALLOWED_CHANNELS = new Set<string>(channels);

export type BrokerOptions = {
  db: Db;
  /** 0 picks a free port. Default MQTT_PORT or 1883. */
  port?: number;
  /** Default MQTT_HOST or 127.0.0.1. */
  host?: string;
  ingestPassword?: string;
  /** Messages kept for the ingester while it is away, beyond which new ones are dropped and counted. */
  ingestQueueMax?: number;
  /** Create the ingester's session at start-up so nothing is missed before it first connects. Default true. */
  reserveIngestSession?: boolean;
  /** SQLite file that keeps queued messages across a restart; default `broker-queue.db` beside the database. */
  queueFile?: string;
  /** Socket limits checked before parsing; defaults from MQTT_MAX_PACKET_BYTES (256 KiB), 16 KiB and 64 KiB. */
  limits?: Partial<GuardLimits>;
  /** A client that has not sent CONNECT by then is dropped. Default 10 s. */
  connectTimeoutMs?: number;
  statusIntervalMs?: number;
  revocationSweepMs?: number;
  log?: (msg: string) => void;
};

export type BrokerCounters = {
  connectionsAccepted: number;
  authFailed: number;
  clientIdDenied: number;
  publishDenied: number;
  subscribeDenied: number;
  credentialRevoked: number;
  messagesIn: number;
  ingestQueue: number;
  ingestQueueDropped: number;
  clientErrors: number;
  bcryptChecks: number;
  credentialCacheHits: number;
  auditRows: number;
  auditSuppressed: number;
  queueFileErrors: number;
  /** Refused connections, publishes and subscriptions by reason, since the broker started. */
  refused: Record<string, number>;
};

export type BrokerHandle = {
  port: number;
  /** Drains what the ingester still has to receive (for a moment), then closes every connection and the listener. */
  close(): Promise<void>;
  /** Closes the listener and drops every connection but keeps sessions and queued messages. */
  stopListening(): Promise<void>;
  /** Listens again on the same port after stopListening. */
  listen(): Promise<void>;
  stats(): BrokerCounters & { connectedClients: number; devicesConnected: number; ingesterConnected: boolean; startedAt: number };
  aedes: Aedes;
};

type SocketWithClient = net.Socket & { client?: Client };

function errorWithCode(message: string, returnCode: number) {
  return Object.assign(new Error(message), { returnCode });
}

function remoteAddress(client: Client | null): string {
  const sock = client?.conn as net.Socket | undefined;
  return sock?.remoteAddress ?? "";
}

const actorFor = (username: string | undefined) => `mqtt:${(username ?? "").slice(0, 64) || "-"}`;

export async function startBroker(opts: BrokerOptions): Promise<BrokerHandle> {
  const { db } = opts;
  const log = opts.log ?? ((m: string) => console.log(`[broker] ${m}`));
  const host = opts.host ?? process.env.MQTT_HOST ?? "127.0.0.1";
  let port = opts.port ?? Number(process.env.MQTT_PORT ?? 1883);
  const ingestQueueMax = opts.ingestQueueMax ?? Number(process.env.MQTT_INGEST_QUEUE_MAX ?? 200_000);
  const credentials = createCredentialChecker(db, { ingestPassword: opts.ingestPassword ?? defaultIngestPassword() });
  const audit = createAuditLimiter(db);
  const identities = new WeakMap<Client, Identity>();
  const deviceClients = new Set<Client>();
  const startedAt = Date.now();
  let ingesterClient: Client | null = null;

  const c: BrokerCounters = {
    connectionsAccepted: 0,
    authFailed: 0,
    clientIdDenied: 0,
    publishDenied: 0,
    subscribeDenied: 0,
    credentialRevoked: 0,
    messagesIn: 0,
    ingestQueue: 0,
    ingestQueueDropped: 0,
    clientErrors: 0,
    bcryptChecks: 0,
    credentialCacheHits: 0,
    auditRows: 0,
    auditSuppressed: 0,
    queueFileErrors: 0,
    refused: {},
  };
  const refuse = (reason: string) => {
    c.refused[reason] = (c.refused[reason] ?? 0) + 1;
  };
  const limits: GuardLimits = {
    maxPacketBytes: Number(process.env.MQTT_MAX_PACKET_BYTES ?? 256 * 1024),
    maxConnectBytes: 16 * 1024,
    maxPreAuthBytes: 64 * 1024,
    ...opts.limits,
  };
  const guards = new WeakMap<net.Socket, PacketGuard>();
  // Publishes refused but acknowledged: aedes sends the PUBACK, then asks publish() to route them, which skips them.
  const dropped = new WeakSet<object>();
  const strikes = new WeakMap<Client, { since: number; n: number }>();
  const queueFile = openQueueFile(opts.queueFile ?? queueFilePath(db.$client.name), log);

  const persistence = new FastMemoryPersistence({
    queueFile,
    shouldDrop(clientId, queued) {
      if (clientId !== INGEST_CLIENT_ID || queued < ingestQueueMax || ingesterClient) return false;
      // Bounded memory while the ingester is away: newest messages are dropped, and counted.
      if (c.ingestQueueDropped++ % 10_000 === 0) {
        audit.record({ action: "mqtt.ingest_queue_full", actor: "broker", ip: "", details: { max: ingestQueueMax } });
      }
      return true;
    },
  });
  const aedes = await Aedes.createBroker({
    id: "airkeep-broker",
    persistence,
    maxClientsIdLength: 128,
    connectTimeout: opts.connectTimeoutMs ?? 10_000,
    authenticate(client, username, password, done) {
      const ip = remoteAddress(client);
      credentials.check(username, password).then(
        (res) => {
          if (!res.ok) {
            c.authFailed++;
            refuse("auth_failed");
            audit.record({
              action: "mqtt.auth_failed",
              actor: actorFor(username),
              ip,
              targetType: "mqtt_client",
              targetId: client.id?.slice(0, 128) ?? null,
              details: { reason: res.reason },
            });
            return done(errorWithCode("bad user name or password", 4), false);
          }
          const id = res.identity;
          const cid = client.id ?? "";
          const clientIdOk =
            id.kind === "ingester"
              ? cid.startsWith(RESERVED_CLIENT_ID_PREFIX)
              : cid === id.deviceId || cid.startsWith(`${id.deviceId}:`);
          if (!clientIdOk) {
            c.clientIdDenied++;
            refuse("client_id_not_allowed");
            audit.record({
              action: "mqtt.auth_failed",
              actor: actorFor(username),
              ip,
              targetType: "mqtt_client",
              targetId: cid.slice(0, 128),
              siteId: id.kind === "device" ? id.siteId : null,
              details: { reason: "client_id_not_allowed" },
            });
            return done(errorWithCode("client id not allowed for this credential", 2), false);
          }
          identities.set(client, id);
          const guard = guards.get(client.conn as net.Socket);
          if (guard) guard.authenticated = true;
          done(null, true);
        },
        (err: Error) => {
          log(`authentication error: ${err.message}`);
          done(errorWithCode("server unavailable", 3), false);
        },
      );
    },
    authorizePublish(client, packet, done) {
      const deny = (reason: string, id: Identity | undefined) => {
        c.publishDenied++;
        refuse(reason);
        audit.record({
          action: "mqtt.publish_denied",
          actor: id?.kind === "device" ? `mqtt:${id.deviceId}` : id?.kind === "ingester" ? "mqtt:ingester" : "mqtt:-",
          ip: remoteAddress(client),
          targetType: id?.kind === "device" ? "compressor" : "mqtt_client",
          targetId: id?.kind === "device" ? String(id.compressorId) : (client?.id?.slice(0, 128) ?? null),
          siteId: id?.kind === "device" ? id.siteId : null,
          details: { reason, topic: packet.topic.slice(0, 200), retain: !!packet.retain },
        });
        if (!client) return done(new Error(`publish denied: ${reason}`));
        // Acknowledged and dropped, so the client does not send it again after every reconnect; only a stream of
        // refusals closes the connection.
        const now = Date.now();
        let s = strikes.get(client);
        if (!s || now - s.since > 60_000) strikes.set(client, (s = { since: now, n: 0 }));
        if (++s.n > REFUSALS_BEFORE_DISCONNECT) {
          refuse("repeated_refusals");
          return done(new Error(`publish denied: ${reason}, repeatedly`));
        }
        dropped.add(packet);
        done(null);
      };
      if (!client) {
        // A will left behind by a broker instance that is gone: only a device's own status topic.
        const t = parseTopic(packet.topic);
        const row = t && t.channel === "status" ? credentials.lookup(t.deviceId) : null;
        if (!row || row.siteCode !== t?.siteCode) return deny("orphaned_will", undefined);
        c.messagesIn++;
        return done(null);
      }
      const id = identities.get(client);
      if (!id) return deny("not_authenticated", undefined);
      if (id.kind === "ingester") return deny("ingester_is_subscribe_only", id);
      const topic = packet.topic;
      if (!topic.startsWith(id.topicPrefix)) return deny("foreign_topic", id);
      const channel = topic.slice(id.topicPrefix.length);
      if (!ALLOWED_CHANNELS.has(channel)) return deny("unknown_channel", id);
      if (packet.retain && channel !== "status") return deny("retain_only_on_status", id);
      if (packet.payload.length > BROKER_MAX_PAYLOAD) return deny("payload_too_large", id);
      c.messagesIn++;
      done(null);
    },
    authorizeSubscribe(client, sub, done) {
      const id = identities.get(client);
      const ok = id?.kind === "ingester" && (sub.topic === INGEST_TOPIC || sub.topic.startsWith(`${TOPIC_ROOT}/`));
      if (ok) return done(null, sub);
      c.subscribeDenied++;
      refuse("subscribe_denied");
      audit.record({
        action: "mqtt.subscribe_denied",
        actor: id?.kind === "device" ? `mqtt:${id.deviceId}` : "mqtt:-",
        ip: remoteAddress(client),
        targetType: id?.kind === "device" ? "compressor" : "mqtt_client",
        targetId: id?.kind === "device" ? String(id.compressorId) : (client.id?.slice(0, 128) ?? null),
        siteId: id?.kind === "device" ? id.siteId : null,
        details: { topic: sub.topic.slice(0, 200) },
      });
      // A failure code in SUBACK (0x80) rather than a disconnect.
      done(null, null);
    },
  });

  // The ingester's session exists from the start, so what devices publish before it (re)connects is kept for it.
  const existing = await persistence.subscriptionsByClient({ id: INGEST_CLIENT_ID });
  if (opts.reserveIngestSession !== false && !existing.some((s) => s.topic === INGEST_TOPIC)) {
    await persistence.addSubscriptions({ id: INGEST_CLIENT_ID }, [{ topic: INGEST_TOPIC, qos: 1 }]);
  }

  type Done = (err?: Error) => void;
  type Route = (packet: object, client: Client | Done | null, done?: Done) => void;
  const route = (aedes.publish as unknown as Route).bind(aedes);
  (aedes as unknown as { publish: Route }).publish = (packet, client, done) => {
    if (!dropped.has(packet)) return route(packet, client, done);
    dropped.delete(packet);
    (typeof client === "function" ? client : done)?.();
  };

  aedes.on("client", (client) => {
    const id = identities.get(client);
    if (id?.kind === "device") deviceClients.add(client);
    if (client.id === INGEST_CLIENT_ID) ingesterClient = client;
  });
  aedes.on("clientDisconnect", (client) => {
    deviceClients.delete(client);
    if (ingesterClient === client) ingesterClient = null;
  });
  aedes.on("clientError", (client, err) => {
    c.clientErrors++;
    if (!/publish denied|ECONNRESET|EPIPE|keep alive/i.test(err.message)) log(`client ${client.id ?? "?"}: ${err.message}`);
  });
  aedes.on("connectionError", (_client, err) => {
    c.clientErrors++;
    if (/connect did not arrive/.test(err.message)) refuse("connect_timeout");
    else if (/unacceptable protocol version/.test(err.message)) refuse("protocol_version");
    else if (!/ECONNRESET|EPIPE|connection closed/i.test(err.message)) refuse("malformed_packet");
  });
  (aedes as EventEmitter).on("error", (err: Error) => log(`error: ${err.message}`));

  const sockets = new Set<net.Socket>();
  let server: net.Server | null = null;
  const listen = () =>
    new Promise<void>((resolve, reject) => {
      const s = net.createServer((socket: SocketWithClient) => {
        socket.setNoDelay(true);
        c.connectionsAccepted++;
        sockets.add(socket);
        const ip = socket.remoteAddress ?? "";
        guards.set(
          socket,
          guardSocket(socket, limits, (reason) => {
            refuse(reason);
            const client = socket.client;
            audit.record({ action: "mqtt.connection_refused", actor: actorFor(undefined), ip, targetType: "mqtt_client", targetId: client?.id?.slice(0, 128) ?? null, details: { reason } });
          }),
        );
        socket.once("close", () => sockets.delete(socket));
        aedes.handle(socket);
      });
      s.once("error", reject);
      s.listen(port, host, () => {
        s.off("error", reject);
        s.on("error", (e) => log(`listener: ${e.message}`));
        port = (s.address() as net.AddressInfo).port;
        server = s;
        resolve();
      });
    });
  const closeServer = () =>
    new Promise<void>((resolve) => {
      const s = server;
      server = null;
      if (!s) return resolve();
      s.close(() => resolve());
      for (const sock of sockets) sock.destroy();
    });

  await listen();
  log(`listening on ${host}:${port}`);

  // A credential reissued or revoked, or a compressor moved to another site, ends the live connection too.
  const revocationTimer = setInterval(() => {
    for (const client of deviceClients) {
      const id = identities.get(client) as DeviceIdentity | undefined;
      if (!id) continue;
      const row = credentials.lookup(id.deviceId);
      if (row && row.secretHash === id.secretHash && row.siteCode === id.siteCode) continue;
      c.credentialRevoked++;
      refuse("credential_revoked");
      audit.record({
        action: "mqtt.credential_revoked",
        actor: `mqtt:${id.deviceId}`,
        ip: remoteAddress(client),
        targetType: "compressor",
        targetId: String(id.compressorId),
        siteId: id.siteId,
        details: { reason: row ? "credential_or_site_changed" : "device_removed" },
      });
      deviceClients.delete(client);
      client.close();
    }
  }, opts.revocationSweepMs ?? 30_000);
  revocationTimer.unref();

  let lastMessages = 0;
  let lastStatusAt = Date.now();
  const stats = () => ({
    ...c,
    ingestQueue: persistence.queued(INGEST_CLIENT_ID),
    bcryptChecks: credentials.bcryptChecks,
    credentialCacheHits: credentials.cacheHits,
    auditRows: audit.rowsWritten,
    auditSuppressed: audit.suppressed,
    queueFileErrors: queueFile.writeErrors,
    refused: { ...c.refused },
    startedAt,
    connectedClients: aedes.connectedClients,
    devicesConnected: deviceClients.size,
    ingesterConnected: ingesterClient !== null,
  });
  const writeStatus = (running: boolean) => {
    const now = Date.now();
    const s = stats();
    const rate = ((s.messagesIn - lastMessages) * 1000) / Math.max(1, now - lastStatusAt);
    lastMessages = s.messagesIn;
    lastStatusAt = now;
    try {
      writeServiceStatus(db, {
        component: "broker",
        pid: process.pid,
        startedAt,
        updatedAt: now,
        connected: running,
        messagesPerS: Math.round(rate * 10) / 10,
        wsClients: 0,
        lastFlushAt: null,
        counters: {
          ...Object.fromEntries(Object.entries(c).filter(([, v]) => typeof v === "number")),
          ...Object.fromEntries(Object.entries(s.refused).map(([k, v]) => [`refused.${k}`, v])),
          queueFileErrors: s.queueFileErrors,
          ingestQueue: s.ingestQueue,
          bcryptChecks: s.bcryptChecks,
          credentialCacheHits: s.credentialCacheHits,
          auditRows: s.auditRows,
          auditSuppressed: s.auditSuppressed,
          connectedClients: s.connectedClients,
          devicesConnected: s.devicesConnected,
          ingesterConnected: s.ingesterConnected ? 1 : 0,
        },
      });
    } catch (e) {
      log(`status write failed: ${(e as Error).message}`);
    }
  };
  writeStatus(true);
  const statusTimer = setInterval(() => writeStatus(true), opts.statusIntervalMs ?? 5_000);
  statusTimer.unref();

  let closed = false;
  return {
    get port() {
      return port;
    },
    aedes,
    stats,
    stopListening: closeServer,
    listen,
    async close() {
      if (closed) return;
      closed = true;
      clearInterval(revocationTimer);
      clearInterval(statusTimer);
      const serverClosed = closeServerGracefully();
      for (const client of [...deviceClients]) {
        // A planned shutdown is not the device's comms failure: no last will (they reconnect on their own).
        (client as unknown as { will: unknown }).will = null;
        client.close();
      }
      // Give the ingester a moment to take what devices already handed over (they will not resend it).
      const deadline = Date.now() + 2_000;
      while (ingesterClient && persistence.queued(INGEST_CLIENT_ID) > 0 && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 20));
      }
      await new Promise<void>((resolve) => aedes.close(() => resolve()));
      for (const sock of sockets) sock.destroy();
      queueFile.close();
      await serverClosed;
      audit.close();
      writeStatus(false);
    },
  };

  function closeServerGracefully(): Promise<void> {
    return new Promise<void>((resolve) => {
      const s = server;
      server = null;
      if (!s) return resolve();
      s.close(() => resolve());
    });
  }
}

