import mqtt, { type IClientOptions, type MqttClient } from "mqtt";
import type { Db } from "@/db/client";
import { createReadingStore } from "@/db/readings";
import {
  type CompressorStateInput,
  createTelemetryStateWriter,
  type DeviceEventInput,
  listCompressorStates,
  writeServiceStatus,
} from "@/db/telemetry-state";
import { INGEST_CLIENT_ID, INGEST_TOPIC, INGEST_USERNAME } from "@/lib/broker/ingest-credential";
import { type ReadingInput, telemetryToReading } from "@/shared/telemetry";
import { classifyMessage, DEFAULT_TIME_LIMITS, type RejectReason, rejectReasons, type TimeLimits } from "./classify";
import { createAlarmEngine, type AlarmTransition } from "@/db/alarm-engine";
import { createDeliveryRecorder } from "@/db/delivery-recorder";
import { startCheckpointer } from "./checkpointer";
import { createDeviceDirectory } from "./device-directory";
import { liveAccessCheck } from "./live-access";
import { LiveBoard } from "./live-board";
import { type LiveHub, startLiveHub } from "./live-hub";
import { createRateLimitedLog } from "./reject-log";
import { type PressureField, pressureFields, withholdImplausible } from "./plausibility";
import { createSequenceGuard, type Neighbours } from "./sequence";

export type IngesterOptions = {
  db: Db;
  /** Default MQTT_URL or mqtt://127.0.0.1:1883. */
  mqttUrl?: string;
  username?: string;
  password: string;
  clientId?: string;
  topic?: string;
  timeLimits?: TimeLimits;
  /** Longest a received reading waits before its transaction commits. */
  flushMs?: number;
  /**
   * A batch this large commits at once. Each commit writes every page it touched (about one per compressor), so at
   * high rates larger batches cost less per reading; at a few thousand a second flushMs ends a batch long before.
   */
  batchRows?: number;
  commsTimeoutMs?: number;
  commsSweepMs?: number;
  retentionMs?: number;
  pruneEveryMs?: number;
  statusIntervalMs?: number;
  /**
   * 4 (MQTT 3.1.1, default; the embedded broker speaks only this) or 5. With 5 the broker may send up to 65,535
   * unacknowledged messages instead of its own default window (Mosquitto: 20).
   */
  protocolVersion?: 4 | 5;
  /** How long an MQTT 5 broker keeps the session while the ingester is away. Default 7 days. */
  sessionExpirySeconds?: number;
  /**
   * The broker's cap on unacknowledged QoS 1 messages to this client (Mosquitto: 20 by default). Near it, pending
   * readings commit on a short lull rather than at flushMs, since the broker sends nothing more until they are
   * acknowledged. null: the broker sets none (the embedded broker), and commits come by size and age only. Default 20.
   */
  brokerInflightCap?: number | null;
  /** PUBACK only once the message is committed, so a crash loses nothing the broker still holds. Default true. */
  ackAfterCommit?: boolean;
  live?: {
    host?: string;
    port: number;
    allowedOrigins: readonly string[];
    secret?: string;
    maxConnectionMs?: number;
    coalesceMs?: number;
    pingMs?: number;
  } | null;
  /** Called after each commit with the readings in it (benchmarks measure publish→commit latency with it). */
  onCommit?: (rows: readonly ReadingInput[], committedAt: number) => void;
  /** Evaluate alarms on every committed reading (default true; benchmarks of bare storage turn it off). */
  alarms?: boolean;
  log?: (msg: string) => void;
};

export type IngesterStats = {
  connected: boolean;
  received: number;
  telemetry: number;
  statusMessages: number;
  events: number;
  stored: number;
  rejects: Record<RejectReason, number>;
  flushes: number;
  flushErrors: number;
  lastFlushAt: number | null;
  lastFlushMs: number;
  /** Longest commit since start, ms (it blocks the event loop for that long). */
  slowestFlushMs: number;
  pendingRows: number;
  pruned: number;
  /** Readings accepted as the first of a new run after a gateway restart (seq started over). */
  seqRestarts: number;
  /** Readings that arrived after a later one and were stored in their place (a reconnecting client may reorder). */
  lateReadings: number;
  /** Pressures withheld from stored readings as beyond the model's reach (sensor faults), by field. */
  sensorFaults: Record<PressureField, number>;
  commsLost: number;
  commsRestored: number;
  reconnects: number;
  internalErrors: number;
  live: ReturnType<LiveHub["stats"]> | null;
};

export type Ingester = {
  stats(): IngesterStats;
  /** Commits what is pending now. */
  flush(): void;
  /** Commits what is pending, acknowledges it, disconnects and closes the WebSocket hub. */
  close(): Promise<void>;
  livePort: number | null;
  client: MqttClient;
};

type PendingAck = { messageId: number; generation: number };
type SendPacket = (packet: { cmd: string; messageId?: number }, cb?: (err?: Error) => void, ...rest: unknown[]) => void;

/** Defaults of the batching options; the environment overrides them in config.ts. */
export const ingestDefaults = { flushMs: 100, batchRows: 10_000, brokerInflightCap: 20 } as const;

const IDLE_FLUSH_MS = 2;
const MAX_PENDING_ROWS = 200_000;

export async function startIngester(opts: IngesterOptions): Promise<Ingester> {
  const { db } = opts;
  const log = opts.log ?? ((m: string) => console.log(`[ingester] ${m}`));
  const limits = opts.timeLimits ?? DEFAULT_TIME_LIMITS;
  const flushMs = opts.flushMs ?? ingestDefaults.flushMs;
  const batchRows = opts.batchRows ?? ingestDefaults.batchRows;
  const commsTimeoutMs = opts.commsTimeoutMs ?? 60_000;
  const retentionMs = opts.retentionMs ?? 30 * 86_400_000;
  const pruneEveryMs = opts.pruneEveryMs ?? 60_000;
  const ackAfterCommit = opts.ackAfterCommit ?? true;
  const protocolVersion = opts.protocolVersion ?? 4;
  const inflightCap = opts.brokerInflightCap === undefined ? ingestDefaults.brokerInflightCap : opts.brokerInflightCap;
  const idleFlushAcks = inflightCap === null ? Number.POSITIVE_INFINITY : Math.max(1, inflightCap - 4);
  const startedAt = Date.now();

  // Checkpoints run on their own thread (below), not inside this connection's commits.
  db.$client.pragma("cache_size = -16384");
  db.$client.pragma("wal_autocheckpoint = 0");
  db.$client.pragma("journal_size_limit = 67108864");
  const checkpointer = db.$client.memory ? null : startCheckpointer(db.$client.name);
  const store = createReadingStore(db);
  const stateWriter = createTelemetryStateWriter(db);
  const directory = createDeviceDirectory(db);
  const board = new LiveBoard(listCompressorStates(db));
  const rejectLog = createRateLimitedLog((line) => log(`reject ${line}`));
  const noticeLog = createRateLimitedLog(log);
  const alarmEngine = opts.alarms === false ? null : createAlarmEngine(db, { log: (m) => log(`alarms: ${m}`) });
  // Fills measured for delivery health commit with the readings that end them.
  const delivery = opts.alarms === false ? null : createDeliveryRecorder(db, { alarms: alarmEngine !== null });
  // Readings and the alarm changes they cause commit together, so a restart neither loses nor repeats an alarm.
  const commit = db.$client.transaction(
    (rows: ReadingInput[], events: DeviceEventInput[], states: CompressorStateInput[]) => {
      const res = store.insert(rows);
      stateWriter.upsertStates(states);
      stateWriter.insertEvents(events);
      const transitions: AlarmTransition[] = alarmEngine && rows.length > 0 ? alarmEngine.onReadings(rows, Date.now()) : [];
      if (delivery && rows.length > 0) transitions.push(...delivery.onReadings(rows).transitions);
      return { ...res, transitions };
    },
  );

  const rejects = Object.fromEntries(rejectReasons.map((r) => [r, 0])) as Record<RejectReason, number>;
  const sensorFaults = Object.fromEntries(pressureFields.map((f) => [f, 0])) as Record<PressureField, number>;
  const st = {
    received: 0,
    telemetry: 0,
    statusMessages: 0,
    events: 0,
    stored: 0,
    flushes: 0,
    flushErrors: 0,
    lastFlushAt: null as number | null,
    lastFlushMs: 0,
    slowestFlushMs: 0,
    pruned: 0,
    seqRestarts: 0,
    lateReadings: 0,
    commsLost: 0,
    commsRestored: 0,
    reconnects: 0,
    internalErrors: 0,
  };

  let hub: LiveHub | null = null;
  if (opts.live) {
    // Access is checked when a socket opens and again at every ping (revocation, session limits, site scope).
    hub = await startLiveHub({ board, directory, access: liveAccessCheck(db), ...opts.live, log: (m) => log(m) });
  }
  const notify = (compressorId: number) => hub?.notify(compressorId);

  let pendingRows: ReadingInput[] = [];
  // Pending rows by compressor: not in the table yet, so the sequence rule looks at them too (off the common path).
  let pendingBy = new Map<number, ReadingInput[]>();
  const hold = (r: ReadingInput): void => {
    pendingRows.push(r);
    const list = pendingBy.get(r.compressorId);
    if (list) list.push(r);
    else pendingBy.set(r.compressorId, [r]);
  };
  const heldAround = (compressorId: number, ts: number): Neighbours => {
    const n: Neighbours = store.around(compressorId, ts);
    for (const r of pendingBy.get(compressorId) ?? []) {
      if (r.ts === ts) n.at = r.seq;
      else if (r.ts < ts && (!n.before || r.ts > n.before.ts)) n.before = { seq: r.seq, ts: r.ts };
      else if (r.ts > ts && (!n.after || r.ts < n.after.ts)) n.after = { seq: r.seq, ts: r.ts };
    }
    return n;
  };
  const sequence = createSequenceGuard(
    board.rows().flatMap((r) => (r.ts !== null && r.seq !== null ? [[r.compressorId, { seq: r.seq, ts: r.ts }] as const] : [])),
    heldAround,
  );
  let pendingEvents: DeviceEventInput[] = [];
  let pendingAcks: PendingAck[] = [];
  let flushTimer: NodeJS.Timeout | null = null;
  let idleTimer: NodeJS.Timeout | null = null;
  let generation = 0;
  let connected = false;
  let commsGraceUntil = Number.POSITIVE_INFINITY;
  let closed = false;

  const client = mqtt.connect(opts.mqttUrl ?? process.env.MQTT_URL ?? "mqtt://127.0.0.1:1883", {
    clientId: opts.clientId ?? INGEST_CLIENT_ID,
    username: opts.username ?? INGEST_USERNAME,
    password: opts.password,
    clean: false,
    protocolVersion,
    ...(protocolVersion === 5
      ? { properties: { sessionExpiryInterval: opts.sessionExpirySeconds ?? 7 * 86_400, receiveMaximum: 65_535 } }
      : {}),
    keepalive: 30,
    reconnectPeriod: 1_000,
    connectTimeout: 10_000,
    resubscribe: true,
  } satisfies IClientOptions);

  const raw = client as unknown as { _sendPacket: SendPacket };
  const sendPacket: SendPacket = raw._sendPacket.bind(client);
  if (ackAfterCommit) {
    // mqtt.js acknowledges a QoS 1 message as soon as it is handled; hold the PUBACK until the row is committed.
    raw._sendPacket = (packet, cb, ...rest) => {
      if (packet.cmd !== "puback" || packet.messageId === undefined) return sendPacket(packet, cb, ...rest);
      pendingAcks.push({ messageId: packet.messageId, generation });
      if (pendingAcks.length >= idleFlushAcks) armIdleFlush();
      scheduleFlush();
      cb?.();
    };
  }

  function sendAcks(acks: PendingAck[]): void {
    if (!client.connected || acks.length === 0) return;
    // The whole batch in one buffer and one write. A PUBACK is 4 bytes (MQTT 3.1.1 §3.4; in MQTT 5 a success without
    // properties may be sent the same way, §3.4.2.1).
    const buf = Buffer.allocUnsafe(acks.length * 4);
    let n = 0;
    for (const a of acks) {
      // An ack meant for an earlier connection would acknowledge some other message on this one.
      if (a.generation !== generation) continue;
      buf[n] = 0x40;
      buf[n + 1] = 0x02;
      buf.writeUInt16BE(a.messageId, n + 2);
      n += 4;
    }
    if (n > 0) client.stream.write(n === buf.length ? buf : buf.subarray(0, n));
  }

  function scheduleFlush(): void {
    if (!flushTimer) flushTimer = setTimeout(flush, flushMs);
  }

  function armIdleFlush(): void {
    if (idleTimer) idleTimer.refresh();
    else idleTimer = setTimeout(flush, IDLE_FLUSH_MS);
  }

  function flush(): void {
    if (flushTimer) clearTimeout(flushTimer);
    if (idleTimer) clearTimeout(idleTimer);
    flushTimer = null;
    idleTimer = null;
    const rows = pendingRows;
    const events = pendingEvents;
    const acks = pendingAcks;
    pendingRows = [];
    pendingBy = new Map();
    pendingEvents = [];
    pendingAcks = [];
    const states = board.takeDirty();
    if (rows.length === 0 && events.length === 0 && states.length === 0) {
      sendAcks(acks);
      return;
    }
    const t0 = performance.now();
    let res: ReturnType<typeof commit>;
    try {
      res = commit.immediate(rows, events, states);
      st.stored += res.inserted;
      if (res.duplicates > 0) {
        rejects.duplicate += res.duplicates;
        rejectLog.note("duplicate", `${res.duplicates} reading(s) already stored`);
      }
      if (res.conflicts > 0) {
        rejects.sameTimestamp += res.conflicts;
        rejectLog.note("sameTimestamp", `${res.conflicts} reading(s) in a millisecond another reading already holds`);
      }
    } catch (e) {
      st.flushErrors++;
      alarmEngine?.resync();
      log(`commit failed, will retry: ${(e as Error).message}`);
      // Not acknowledged, so the broker still holds them; keep a bounded copy to retry.
      const held = rows.concat(pendingRows).slice(-MAX_PENDING_ROWS);
      pendingRows = [];
      pendingBy = new Map();
      for (const r of held) hold(r);
      pendingEvents = events.concat(pendingEvents).slice(-10_000);
      pendingAcks = acks.concat(pendingAcks);
      board.markDirty(states.map((x) => x.compressorId));
      flushTimer = setTimeout(flush, 1_000);
      return;
    }
    const now = Date.now();
    st.flushes++;
    st.lastFlushAt = now;
    st.lastFlushMs = performance.now() - t0;
    st.slowestFlushMs = Math.max(st.slowestFlushMs, st.lastFlushMs);
    sendAcks(acks);
    for (const t of res.transitions) notify(t.compressorId);
    if (rows.length > 0) opts.onCommit?.(rows, now);
  }

  function reject(reason: RejectReason, detail: string, topic: string): void {
    rejects[reason]++;
    rejectLog.note(reason, `${detail} [${topic.slice(0, 120)}]`);
  }

  function commsUp(compressorId: number, now: number, text: string): void {
    const prev = board.row(compressorId);
    const everSeen = prev?.lastSeenAt != null;
    if (board.setOnline(compressorId, true, now) && everSeen) {
      st.commsRestored++;
      alarmEngine?.onCommsRestored(compressorId, now, now);
      pendingEvents.push({ ts: now, compressorId, kind: "comms_restored", runState: null, tripCode: null, text, receivedAt: now });
    }
  }

  function commsDown(compressorId: number, now: number, ts: number, text: string): void {
    if (!board.setOnline(compressorId, false, now)) return;
    st.commsLost++;
    alarmEngine?.onCommsLost(compressorId, ts, now);
    pendingEvents.push({ ts, compressorId, kind: "comms_lost", runState: null, tripCode: null, text, receivedAt: now });
    notify(compressorId);
    scheduleFlush();
  }

  function onMessage(topic: string, payload: Buffer, packet: mqtt.IPublishPacket): void {
    const now = Date.now();
    st.received++;
    const c = classifyMessage(topic, payload, now, directory.byDeviceId, limits);
    if (!c.ok) return reject(c.reason, c.detail, topic);
    const id = c.device.compressorId;
    switch (c.channel) {
      case "telemetry": {
        st.telemetry++;
        // The device is talking even when the reading breaks the sequence rule.
        commsUp(id, now, "Telemetry resumed");
        board.seen(id, now);
        const verdict = sequence.check(id, c.msg.seq, c.msg.ts);
        if (verdict === "restart") {
          st.seqRestarts++;
          noticeLog.note("sequence restart", `${c.device.deviceId} started a new run at seq ${c.msg.seq}`);
        } else if (verdict === "late") {
          st.lateReadings++;
        } else if (verdict !== "next") {
          reject(verdict, `${c.device.deviceId} seq ${c.msg.seq} ts ${c.msg.ts}`, topic);
          break;
        }
        const reading = telemetryToReading(id, c.msg);
        for (const f of withholdImplausible(reading, c.device.ratedPressureBar)) {
          sensorFaults[f]++;
          noticeLog.note(`sensor fault ${c.device.deviceId}`, `${f} ${reading.implausible?.[f]} bar is beyond a ${c.device.ratedPressureBar}-bar model: withheld`);
        }
        hold(reading);
        if (board.applyReading(reading, now)) notify(id);
        break;
      }
      case "event": {
        st.events++;
        const ev = c.msg;
        pendingEvents.push({
          ts: ev.ts,
          compressorId: id,
          kind: ev.kind,
          runState: ev.runState,
          tripCode: ev.tripCode ?? null,
          text: ev.text ?? "",
          receivedAt: now,
        });
        commsUp(id, now, "Device events resumed");
        board.seen(id, now);
        if (board.applyEvent(id, ev, now)) notify(id);
        break;
      }
      case "status": {
        st.statusMessages++;
        if (c.msg.status === "offline") {
          commsDown(id, now, c.msg.ts ?? now, packet.retain ? "Device offline (retained status)" : "Device went offline (last will or disconnect)");
        } else if (!packet.retain) {
          // A retained "online" only says the device connected at some point, not that it is reporting now.
          sequence.reconnected(id);
          commsUp(id, now, "Device connected");
          board.seen(id, now);
          notify(id);
        }
        break;
      }
    }
    if (pendingRows.length >= batchRows) setImmediate(flush);
    else scheduleFlush();
  }

  client.on("message", (topic, payload, packet) => {
    try {
      onMessage(topic, payload, packet);
    } catch (e) {
      st.internalErrors++;
      rejectLog.note("internal", (e as Error).stack ?? String(e));
    }
  });

  let everConnected = false;
  client.on("connect", (connack) => {
    connected = true;
    commsGraceUntil = Date.now() + commsTimeoutMs;
    log(`connected (session ${connack.sessionPresent ? "resumed" : "new"})`);
    setImmediate(writeStatus);
    if (!everConnected) {
      everConnected = true;
      client.subscribe(opts.topic ?? INGEST_TOPIC, { qos: 1 }, (err, granted) => {
        if (err || granted?.some((g) => g.qos === 128)) log(`subscribe refused: ${err?.message ?? "not authorized"}`);
      });
    }
  });
  client.on("reconnect", () => {
    st.reconnects++;
  });
  client.on("close", () => {
    if (connected && !closed) log("disconnected from broker; reconnecting");
    connected = false;
    generation++;
    commsGraceUntil = Number.POSITIVE_INFINITY;
  });
  client.on("error", (err) => rejectLog.note("mqtt", err.message));

  // Comms loss: silence past the timeout, judged only while this process itself is connected to the broker.
  const commsTimer = setInterval(() => {
    const now = Date.now();
    if (!connected || now < commsGraceUntil) return;
    for (const row of board.rows()) {
      if (row.online && row.lastSeenAt !== null && now - row.lastSeenAt > commsTimeoutMs) {
        commsDown(row.compressorId, now, now, `No message for ${Math.round((now - row.lastSeenAt) / 1000)} s`);
      }
    }
  }, opts.commsSweepMs ?? 5_000);
  commsTimer.unref();

  const alarmTimer = setInterval(() => {
    try {
      for (const t of alarmEngine?.tick(Date.now()) ?? []) notify(t.compressorId);
    } catch (e) {
      st.internalErrors++;
      log(`alarm tick failed: ${(e as Error).message}`);
    }
  }, 1_000);
  alarmTimer.unref();

  let pruneTimer: NodeJS.Timeout | null = null;
  const prune = () => {
    const budget = 20_000;
    let n = 0;
    try {
      n = store.prune(Date.now(), retentionMs, { chunkRows: 2_000, maxRows: budget });
      st.pruned += n;
    } catch (e) {
      log(`prune failed: ${(e as Error).message}`);
    }
    // More to do: continue shortly, letting batches commit in between.
    pruneTimer = setTimeout(prune, n >= budget ? 250 : pruneEveryMs);
    pruneTimer.unref();
  };
  pruneTimer = setTimeout(prune, Math.min(10_000, pruneEveryMs));
  pruneTimer.unref();

  let lastReceived = 0;
  let lastStatusAt = startedAt;
  const stats = (): IngesterStats => ({
    connected,
    ...st,
    rejects: { ...rejects },
    sensorFaults: { ...sensorFaults },
    pendingRows: pendingRows.length,
    live: hub?.stats() ?? null,
  });
  const writeStatus = () => {
    const now = Date.now();
    const s = stats();
    const rate = ((s.received - lastReceived) * 1000) / Math.max(1, now - lastStatusAt);
    lastReceived = s.received;
    lastStatusAt = now;
    const counters: Record<string, number> = {
      received: s.received,
      telemetry: s.telemetry,
      statusMessages: s.statusMessages,
      events: s.events,
      stored: s.stored,
      flushes: s.flushes,
      flushErrors: s.flushErrors,
      lastFlushMs: Math.round(s.lastFlushMs * 10) / 10,
      slowestFlushMs: Math.round(s.slowestFlushMs),
      pendingRows: s.pendingRows,
      pruned: s.pruned,
      seqRestarts: s.seqRestarts,
      lateReadings: s.lateReadings,
      commsLost: s.commsLost,
      commsRestored: s.commsRestored,
      reconnects: s.reconnects,
      internalErrors: s.internalErrors,
      rssMb: Math.round(process.memoryUsage.rss() / 1048576),
    };
    for (const r of rejectReasons) counters[`reject.${r}`] = s.rejects[r];
    for (const f of pressureFields) counters[`sensorFault.${f}`] = s.sensorFaults[f];
    if (s.live) {
      counters["ws.accepted"] = s.live.accepted;
      counters["ws.refusedToken"] = s.live.refusedToken;
      counters["ws.refusedOrigin"] = s.live.refusedOrigin;
      counters["ws.refusedAccess"] = s.live.refusedAccess;
      counters["ws.closedRevoked"] = s.live.closedRevoked;
      counters["ws.rescoped"] = s.live.rescoped;
      counters["ws.droppedSlow"] = s.live.droppedSlow;
      counters["ws.updatesSent"] = s.live.updatesSent;
    }
    try {
      writeServiceStatus(db, {
        component: "ingester",
        pid: process.pid,
        startedAt,
        updatedAt: now,
        connected: s.connected,
        messagesPerS: Math.round(rate * 10) / 10,
        wsClients: s.live?.clients ?? 0,
        lastFlushAt: s.lastFlushAt,
        counters,
      });
    } catch (e) {
      log(`status write failed: ${(e as Error).message}`);
    }
  };
  writeStatus();
  const statusTimer = setInterval(writeStatus, opts.statusIntervalMs ?? 5_000);
  statusTimer.unref();

  return {
    stats,
    flush,
    livePort: hub?.port ?? null,
    client,
    async close() {
      if (closed) return;
      closed = true;
      clearInterval(commsTimer);
      clearInterval(alarmTimer);
      clearInterval(statusTimer);
      if (pruneTimer) clearTimeout(pruneTimer);
      await hub?.close();
      flush();
      await new Promise<void>((resolve) => client.end(false, {}, () => resolve()));
      connected = false;
      if (flushTimer) clearTimeout(flushTimer);
      if (idleTimer) clearTimeout(idleTimer);
      directory.close();
      await checkpointer?.close();
      db.$client.pragma("wal_autocheckpoint = 1000");
      rejectLog.flush();
      noticeLog.flush();
      writeStatus();
    },
  };
}
