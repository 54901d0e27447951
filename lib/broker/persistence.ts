import { Readable } from "node:stream";
import type { QueueFile } from "./queue-file";

// In-memory session store for aedes with constant-time queue operations. The stock memory store scans a
// client's whole outgoing queue on every delivery and every PUBACK, so a subscriber that falls behind (or
// holds acknowledgements until its commit) makes the broker slower the further behind it is.
// Subscriptions are matched by a scan: in Airkeep only the ingester subscribes, so there are a handful.
// With a queue file, outgoing queues are mirrored to disk and reloaded at start (see queue-file.ts).

type Packet = {
  cmd?: string;
  topic: string;
  payload: Buffer;
  qos: number;
  retain?: boolean;
  dup?: boolean;
  messageId?: number;
  brokerId?: string;
  brokerCounter?: number;
  clientId?: string;
  nl?: boolean;
  properties?: unknown;
  messageExpiry?: number;
};
type SubRecord = { qos: number; rh?: number; rap?: boolean; nl?: boolean; subscriptionIdentifier?: number };
type Sub = SubRecord & { topic: string };
type MatchedSub = { clientId: string; topic: string; qos: number; rh?: number; rap?: boolean; nl?: boolean };
type ClientRef = { id: string };

/** The same copy aedes-packet makes: a queued message has no packet identifier until it is sent. */
function copyPacket(original: Packet): Packet {
  const p: Packet = {} as Packet;
  if (Object.hasOwn(original, "clientId")) p.clientId = original.clientId;
  if (Object.hasOwn(original, "nl")) p.nl = original.nl;
  if (Object.hasOwn(original, "properties")) p.properties = original.properties;
  if (Object.hasOwn(original, "messageExpiry")) p.messageExpiry = original.messageExpiry;
  p.cmd = original.cmd || "publish";
  p.brokerId = original.brokerId;
  p.brokerCounter = original.brokerCounter || 0;
  p.topic = original.topic;
  p.payload = original.payload || Buffer.alloc(0);
  p.qos = original.qos || 0;
  p.retain = original.retain || false;
  p.dup = original.dup || false;
  if (p.qos > 0 || p.cmd !== "publish") p.messageId = undefined;
  return p;
}

/** MQTT topic filter match: `+` one level, `#` this level and everything below (or nothing). */
export function topicMatches(filter: string, topic: string): boolean {
  if (filter === topic) return true;
  const f = filter.split("/");
  const t = topic.split("/");
  for (let i = 0; i < f.length; i++) {
    const w = f[i];
    if (w === "#") return true;
    if (i >= t.length) return false;
    if (w !== "+" && w !== t[i]) return false;
  }
  return f.length === t.length;
}

/** Messages reloaded from the queue file: the new broker instance numbers its own messages from 1 again. */
const RESTORED_BROKER_ID = "restored";

class OutgoingQueue {
  readonly items = new Map<number, Packet>();
  private byCounter = new Map<string, number>();
  private byMessageId = new Map<number, number>();

  private static key(p: Packet): string {
    return `${p.brokerId}\u0000${p.brokerCounter}`;
  }

  push(p: Packet, s: number): void {
    this.items.set(s, p);
    this.byCounter.set(OutgoingQueue.key(p), s);
  }

  private setMessageId(s: number, p: Packet, messageId: number | undefined): void {
    if (p.messageId !== undefined && this.byMessageId.get(p.messageId) === s) this.byMessageId.delete(p.messageId);
    p.messageId = messageId;
    if (messageId !== undefined) this.byMessageId.set(messageId, s);
  }

  update(packet: Packet): void {
    const s = this.byCounter.get(OutgoingQueue.key(packet));
    if (s !== undefined) {
      this.setMessageId(s, this.items.get(s)!, packet.messageId);
      return;
    }
    // A message queued by another broker instance, now re-sent under the same identifier: it takes that place.
    const m = packet.messageId === undefined ? undefined : this.byMessageId.get(packet.messageId);
    const old = m === undefined ? undefined : this.items.get(m);
    if (m !== undefined && old && old.brokerId !== packet.brokerId) {
      this.byCounter.delete(OutgoingQueue.key(old));
      this.items.set(m, packet);
      this.byCounter.set(OutgoingQueue.key(packet), m);
      return;
    }
    throw new Error("no such packet");
  }

  clear(messageId: number | undefined): { p: Packet; s: number } | undefined {
    const s = messageId === undefined ? undefined : this.byMessageId.get(messageId);
    if (s === undefined) return undefined;
    const p = this.items.get(s)!;
    this.items.delete(s);
    this.byMessageId.delete(messageId!);
    this.byCounter.delete(OutgoingQueue.key(p));
    return { p, s };
  }
}

export type PersistenceOptions = {
  /** Asked before a message is queued for a client; true drops it for that client. */
  shouldDrop?: (clientId: string, queued: number) => boolean;
  /** Keeps outgoing queues across a restart: loaded now, then every change is mirrored to it. */
  queueFile?: QueueFile;
};

export class FastMemoryPersistence {
  private retained = new Map<string, Packet>();
  private subscriptions = new Map<string, Map<string, SubRecord>>();
  private qosSubs: MatchedSub[] = [];
  private matchCache = new Map<string, MatchedSub[]>();
  private outgoing = new Map<string, OutgoingQueue>();
  private incoming = new Map<string, Map<number, Packet>>();
  private wills = new Map<string, Packet>();
  private destroyed = false;
  private broker: { id: string } | null = null;
  /** Numbers queued messages across all clients (the queue file's key). */
  private seq = 0;

  constructor(private readonly opts: PersistenceOptions = {}) {
    for (const r of opts.queueFile?.load() ?? []) {
      const p = copyPacket({ topic: r.topic, payload: r.payload, qos: r.qos, retain: r.retain, brokerId: RESTORED_BROKER_ID, brokerCounter: r.seq });
      this.queue(r.clientId).push(p, r.seq);
      this.seq = Math.max(this.seq, r.seq);
    }
  }

  private queue(clientId: string): OutgoingQueue {
    let q = this.outgoing.get(clientId);
    if (!q) {
      q = new OutgoingQueue();
      this.outgoing.set(clientId, q);
    }
    return q;
  }

  async setup(broker: { id: string }): Promise<void> {
    this.broker = broker;
  }

  /** Messages queued for the client and not yet acknowledged. */
  queued(clientId: string): number {
    return this.outgoing.get(clientId)?.items.size ?? 0;
  }

  async storeRetained(pkt: Packet): Promise<void> {
    if (pkt.payload.length === 0) this.retained.delete(pkt.topic);
    else this.retained.set(pkt.topic, { ...pkt });
  }

  private *retainedMatching(pattern: string): Generator<Packet> {
    for (const [topic, packet] of this.retained) if (topicMatches(pattern, topic)) yield packet;
  }

  createRetainedStream(pattern: string): Readable {
    return Readable.from(this.retainedMatching(pattern));
  }

  createRetainedStreamCombi(patterns: string[]): Readable {
    const matching = (p: string) => this.retainedMatching(p);
    return Readable.from(
      (function* () {
        for (const p of patterns) yield* matching(p);
      })(),
    );
  }

  private rebuildIndex(): void {
    const subs: MatchedSub[] = [];
    for (const [clientId, m] of this.subscriptions) {
      for (const [topic, s] of m) if (s.qos > 0) subs.push({ clientId, topic, qos: s.qos, rh: s.rh, rap: s.rap, nl: s.nl });
    }
    // Multi-level wildcards first, the order the stock store's trie returns them in.
    this.qosSubs = subs.sort((a, b) => Number(b.topic.includes("#")) - Number(a.topic.includes("#")));
    this.matchCache.clear();
  }

  async addSubscriptions(client: ClientRef, subs: Sub[]): Promise<void> {
    let stored = this.subscriptions.get(client.id);
    if (!stored) {
      stored = new Map();
      this.subscriptions.set(client.id, stored);
    }
    for (const sub of subs) {
      const record: SubRecord = { qos: sub.qos, rh: sub.rh, rap: sub.rap, nl: sub.nl };
      if (sub.subscriptionIdentifier !== undefined) record.subscriptionIdentifier = sub.subscriptionIdentifier;
      stored.set(sub.topic, record);
    }
    this.rebuildIndex();
  }

  async removeSubscriptions(client: ClientRef, topics: string[]): Promise<void> {
    const stored = this.subscriptions.get(client.id);
    if (!stored) return;
    for (const t of topics) stored.delete(t);
    if (stored.size === 0) this.subscriptions.delete(client.id);
    this.rebuildIndex();
  }

  async subscriptionsByClient(client: ClientRef): Promise<Sub[]> {
    const stored = this.subscriptions.get(client.id);
    return stored ? [...stored].map(([topic, s]) => ({ topic, ...s })) : [];
  }

  async countOffline(): Promise<{ subsCount: number; clientsCount: number }> {
    return { subsCount: this.qosSubs.length, clientsCount: this.subscriptions.size };
  }

  async subscriptionsByTopic(topic: string): Promise<MatchedSub[]> {
    let hit = this.matchCache.get(topic);
    if (!hit) {
      hit = this.qosSubs.filter((s) => topicMatches(s.topic, topic));
      if (this.matchCache.size >= 50_000) this.matchCache.clear();
      this.matchCache.set(topic, hit);
    }
    return hit.map((s) => ({ ...s }));
  }

  async cleanSubscriptions(client: ClientRef): Promise<void> {
    if (this.subscriptions.delete(client.id)) this.rebuildIndex();
  }

  private enqueue(clientId: string, packet: Packet): void {
    const q = this.queue(clientId);
    if (this.opts.shouldDrop?.(clientId, q.items.size)) return;
    const p = copyPacket(packet);
    const s = ++this.seq;
    q.push(p, s);
    this.opts.queueFile?.added(clientId, s, p);
  }

  async outgoingEnqueue(sub: { clientId: string }, packet: Packet): Promise<void> {
    this.enqueue(sub.clientId, packet);
  }

  async outgoingEnqueueCombi(subs: { clientId: string }[], packet: Packet): Promise<void> {
    for (const s of subs) this.enqueue(s.clientId, packet);
  }

  async outgoingUpdate(client: ClientRef, packet: Packet): Promise<void> {
    const q = this.outgoing.get(client.id);
    if (!q) throw new Error("no such packet");
    q.update(packet);
  }

  async outgoingClearMessageId(client: ClientRef, packet: { messageId?: number }): Promise<Packet | undefined> {
    const hit = this.outgoing.get(client.id)?.clear(packet.messageId);
    if (hit) this.opts.queueFile?.removed(hit.s);
    return hit?.p;
  }

  outgoingStream(client: ClientRef): Readable {
    return Readable.from([...(this.outgoing.get(client.id)?.items.values() ?? [])]);
  }

  async incomingStorePacket(client: ClientRef, packet: Packet): Promise<void> {
    let store = this.incoming.get(client.id);
    if (!store) {
      store = new Map();
      this.incoming.set(client.id, store);
    }
    const p = copyPacket(packet);
    p.messageId = packet.messageId;
    store.set(packet.messageId!, p);
  }

  async incomingGetPacket(client: ClientRef, packet: { messageId?: number }): Promise<Packet> {
    const p = this.incoming.get(client.id)?.get(packet.messageId!);
    if (!p) throw new Error("no such packet");
    return p;
  }

  async incomingDelPacket(client: ClientRef, packet: { messageId?: number }): Promise<void> {
    const store = this.incoming.get(client.id);
    if (!store?.delete(packet.messageId!)) throw new Error("no such packet");
  }

  async cleanIncoming(client: ClientRef): Promise<void> {
    this.incoming.delete(client.id);
  }

  async putWill(client: ClientRef, packet: Packet): Promise<void> {
    packet.brokerId = this.broker?.id;
    packet.clientId = client.id;
    this.wills.set(client.id, packet);
  }

  async getWill(client: ClientRef): Promise<Packet | undefined> {
    return this.wills.get(client.id);
  }

  async delWill(client: ClientRef): Promise<Packet | undefined> {
    const will = this.wills.get(client.id);
    this.wills.delete(client.id);
    return will;
  }

  streamWill(brokers: Record<string, unknown> = {}): Readable {
    return Readable.from([...this.wills.values()].filter((w) => !brokers[w.brokerId ?? ""]));
  }

  getClientList(topic: string): Readable {
    return Readable.from([...this.subscriptions].filter(([, m]) => m.has(topic)).map(([id]) => id));
  }

  async destroy(): Promise<void> {
    if (this.destroyed) throw new Error("destroyed called twice!");
    this.destroyed = true;
    this.retained.clear();
    this.opts.queueFile?.close();
  }
}
