import mqtt, { type MqttClient } from "mqtt";
import { topicFor } from "../shared/telemetry";
import { tripCodeLabel } from "../shared/trip-codes";
import { DeviceSim, type CommsState } from "./device-sim";
import type { DemoDevice } from "./devices";
import { eventMessage, LAST_WILL, offlineStatus, onlineStatus, SequenceCounter, telemetryMessage } from "./messages";
import type { ModelEvent } from "./model/compressor";
import { demoIncidents, type FaultSpec } from "./model/faults";
import { DAY_MS } from "./model/local-time";
import type { SavedCounters } from "./state-file";

export type PublisherOptions = {
  url: string;
  devices: readonly DemoDevice[];
  seed: string;
  /** Real seconds between telemetry messages. */
  intervalS: number;
  /** Model seconds per real second. Message timestamps stay real time. */
  speed: number;
  telemetryQos: 0 | 1;
  /** Scheduled faults, in model time. */
  faults?: readonly FaultSpec[];
  /** Demo incidents per model day across the fleet; 0 for none. */
  incidentsPerDay?: number;
  /** Counters to continue from, by device id. */
  init?: ReadonlyMap<string, Partial<SavedCounters>>;
  log?: (line: string) => void;
  /** Called about once a minute and on stop with every device's counters. */
  onCounters?: (counters: Map<string, SavedCounters>) => void;
  /** Longest model step, s (default 1). */
  maxStepS?: number;
};

type Link = {
  device: DemoDevice;
  sim: DeviceSim;
  client: MqttClient | null;
  seq: SequenceCounter;
  held: { e: ModelEvent; ts: number }[];
  comms: CommsState;
  lastEventTs: number;
  topics: { telemetry: string; status: string; event: string };
};

const MAX_HELD_EVENTS = 1_000;

/**
 * Publishes a fleet as real gateways would: one MQTT client per compressor with its own credential, a retained
 * online/offline status with a last will, telemetry every interval and state changes and trips at QoS 1.
 * Model time starts at the real start time and runs `speed` times faster.
 */
export class FleetPublisher {
  private readonly links: Link[] = [];
  private readonly opts: PublisherOptions;
  private timer: NodeJS.Timeout | null = null;
  private realStart = 0;
  private lastReal = 0;
  private modelNow = 0;
  private ticks = 0;
  private incidentsUntil = 0;
  private lastCountersAt = 0;
  private stopped = false;
  private readonly log: (line: string) => void;

  constructor(opts: PublisherOptions) {
    if (!(opts.intervalS > 0)) throw new Error("interval must be positive");
    if (!(opts.speed > 0)) throw new Error("speed must be positive");
    this.opts = opts;
    this.log = opts.log ?? (() => {});
  }

  /** Connects every device (retrying in the background if the broker is not up yet) and starts publishing. */
  start(now = Date.now()): void {
    this.realStart = this.lastReal = this.lastCountersAt = now;
    this.modelNow = now;
    this.incidentsUntil = now;
    for (const device of this.opts.devices) {
      const sim = new DeviceSim(device, {
        seed: this.opts.seed,
        startMs: now,
        init: this.opts.init?.get(device.deviceId) ?? {},
        faults: this.opts.faults ?? [],
        maxStepS: this.opts.maxStepS ?? 1,
      });
      const link: Link = {
        device,
        sim,
        client: null,
        seq: new SequenceCounter(),
        held: [],
        comms: "ok",
        lastEventTs: 0,
        topics: {
          telemetry: topicFor(device.siteCode, device.deviceId, "telemetry"),
          status: topicFor(device.siteCode, device.deviceId, "status"),
          event: topicFor(device.siteCode, device.deviceId, "event"),
        },
      };
      link.client = this.connect(link);
      this.links.push(link);
    }
    this.scheduleIncidents();
    this.schedule();
  }

  /** Resolves when every device that should be online has connected at least once. */
  async ready(timeoutMs = 10_000): Promise<void> {
    const deadline = Date.now() + timeoutMs;
    while (this.links.some((l) => l.comms !== "dropped" && !l.client?.connected)) {
      if (Date.now() > deadline) throw new Error("devices did not connect in time");
      await new Promise((r) => setTimeout(r, 20));
    }
  }

  /** Publishes a retained offline status for each connected device (a clean shutdown sends no last will), then disconnects. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.opts.onCounters?.(this.counters());
    await Promise.all(
      this.links.map(async (l) => {
        const c = l.client;
        l.client = null;
        if (!c) return;
        if (c.connected) {
          await withTimeout(
            c.publishAsync(l.topics.status, JSON.stringify(offlineStatus(Date.now())), { qos: 1, retain: true }),
            2_000,
          ).catch(() => {});
          await withTimeout(c.endAsync(), 2_000).catch(() => c.end(true));
        } else {
          c.end(true);
        }
      }),
    );
  }

  counters(): Map<string, SavedCounters> {
    return new Map(this.links.map((l) => [l.device.deviceId, { ...l.sim.model.counters, atMs: Math.round(this.modelNow) }]));
  }

  /** Model time now, ms. */
  get modelTimeMs(): number {
    return this.modelNow;
  }

  sims(): DeviceSim[] {
    return this.links.map((l) => l.sim);
  }

  private connect(link: Link): MqttClient {
    const { device } = link;
    const client = mqtt.connect(this.opts.url, {
      clientId: device.deviceId,
      username: device.deviceId,
      password: device.secret,
      clean: true,
      keepalive: 30,
      reconnectPeriod: 2_000,
      connectTimeout: 10_000,
      // stale telemetry is worthless after a reconnect; events (QoS 1) are still queued and delivered
      queueQoSZero: false,
      will: { topic: link.topics.status, payload: Buffer.from(JSON.stringify(LAST_WILL)), qos: 1, retain: true },
    });
    let lastError = "";
    client.on("connect", () => {
      lastError = "";
      client.publish(link.topics.status, JSON.stringify(onlineStatus(Date.now())), { qos: 1, retain: true });
      this.log(`${device.deviceId}: connected`);
    });
    // the broker may start after us: say once why we cannot connect, not on every retry
    client.on("error", (err) => {
      if (err.message !== lastError) this.log(`${device.deviceId}: ${err.message} (retrying)`);
      lastError = err.message;
    });
    return client;
  }

  private schedule(): void {
    if (this.stopped) return;
    this.ticks++;
    const due = this.realStart + this.ticks * this.opts.intervalS * 1000;
    this.timer = setTimeout(() => this.tick(), Math.max(0, due - Date.now()));
  }

  private scheduleIncidents(): void {
    const perDay = this.opts.incidentsPerDay ?? 0;
    if (perDay <= 0) return;
    while (this.incidentsUntil < this.modelNow + DAY_MS) {
      const from = this.incidentsUntil;
      const to = from + DAY_MS;
      const faults = demoIncidents(this.opts.seed, this.links.map((l) => ({ deviceId: l.device.deviceId, oilPump: l.sim.model.spec.oilPump })), from, to, perDay);
      for (const l of this.links) l.sim.addFaults(faults);
      for (const f of faults) this.log(`incident planned: ${f.deviceId} ${f.kind} at model ${new Date(f.atMs).toISOString()}`);
      this.incidentsUntil = to;
    }
  }

  private tick(): void {
    if (this.stopped) return;
    const realNow = Date.now();
    const dtReal = Math.max(0, realNow - this.lastReal);
    const modelFrom = this.modelNow;
    this.modelNow += dtReal * this.opts.speed;
    this.scheduleIncidents();
    for (const link of this.links) {
      try {
        this.tickLink(link, modelFrom, realNow, dtReal);
      } catch (err) {
        this.log(`${link.device.deviceId}: ${(err as Error).message}`);
      }
    }
    this.lastReal = realNow;
    if (this.opts.onCounters && realNow - this.lastCountersAt >= 60_000) {
      this.lastCountersAt = realNow;
      this.opts.onCounters(this.counters());
    }
    this.schedule();
  }

  private tickLink(link: Link, modelFrom: number, realNow: number, dtReal: number): void {
    const speed = this.opts.speed;
    const events = link.sim.advance((dtReal * speed) / 1000);
    for (const e of events) {
      // map model time back onto the real interval just elapsed, keeping event times strictly increasing
      const ts = Math.max(link.lastEventTs + 1, Math.min(realNow, Math.round(this.lastReal + (e.ts - modelFrom) / speed)));
      link.lastEventTs = ts;
      if (e.kind === "trip") this.log(`${link.device.deviceId}: TRIP ${e.tripCode} ${tripCodeLabel(e.tripCode)}`);
      link.held.push({ e, ts });
    }
    if (link.held.length > MAX_HELD_EVENTS) link.held.splice(0, link.held.length - MAX_HELD_EVENTS);

    const { state } = link.sim.commsAt(this.modelNow);
    if (state !== link.comms) this.commsChange(link, state);
    const reading = link.sim.model.reading();
    const client = link.client;
    if (state !== "ok" || !client?.connected) return;

    for (const { e, ts } of link.held.splice(0)) {
      client.publish(link.topics.event, JSON.stringify(eventMessage(e, link.seq.next(ts), ts)), { qos: 1 });
    }
    const ts = Math.max(realNow, link.lastEventTs + 1);
    const msg = telemetryMessage(reading, link.seq.next(ts), ts);
    client.publish(link.topics.telemetry, JSON.stringify(msg), { qos: this.opts.telemetryQos });
  }

  private commsChange(link: Link, next: CommsState): void {
    const id = link.device.deviceId;
    if (next === "dropped" && link.client) {
      // destroy the socket without DISCONNECT, as a cut cable would: the broker then sends the last will
      link.client.end(true);
      link.client = null;
      this.log(`${id}: link dropped (last will expected)`);
    } else if (next === "silent") {
      this.log(`${id}: gone silent (connection kept, nothing published)`);
    } else if (next === "ok") {
      this.log(`${id}: link restored`);
    }
    if (next !== "dropped" && !link.client) link.client = this.connect(link);
    link.comms = next;
  }
}

function withTimeout<T>(p: Promise<T>, ms: number): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const t = setTimeout(() => reject(new Error("timeout")), ms);
    p.then(
      (v) => {
        clearTimeout(t);
        resolve(v);
      },
      (e: unknown) => {
        clearTimeout(t);
        reject(e instanceof Error ? e : new Error(String(e)));
      },
    );
  });
}
