import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { databasePath } from "@/db/client";

// The broker's outgoing queues on disk, in their own SQLite file (not the app database: no lock shared with the
// ingester's commits). Writes are gathered and committed once per event-loop turn, so a message the ingester
// acknowledges before the commit never touches the disk, and a restart of the broker loses at most one turn's
// messages if the process is killed outright (none on a planned stop, which flushes).

/** The embedded broker's queue file, beside the database. */
export function queueFilePath(dbFile = databasePath()): string {
  return path.join(path.dirname(dbFile), "broker-queue.db");
}

export type QueuedPacket = { topic: string; payload: Buffer; qos: number; retain: boolean };
export type QueueRow = QueuedPacket & { clientId: string; seq: number };

export type QueueFile = {
  /** Everything still queued, oldest first within each client. */
  load(): QueueRow[];
  added(clientId: string, seq: number, packet: Omit<QueuedPacket, "retain"> & { retain?: boolean }): void;
  removed(clientId: string, seq: number): void;
  /** Commits what is pending now. */
  flush(): void;
  close(): void;
  readonly writeErrors: number;
};

export function openQueueFile(file: string, log: (msg: string) => void = () => {}): QueueFile {
  if (file !== ":memory:") fs.mkdirSync(path.dirname(file), { recursive: true });
  const db = new Database(file);
  db.pragma("journal_mode = WAL");
  db.pragma("synchronous = NORMAL");
  db.exec(`CREATE TABLE IF NOT EXISTS outgoing (
    client_id TEXT NOT NULL, seq INTEGER NOT NULL, topic TEXT NOT NULL, payload BLOB NOT NULL,
    qos INTEGER NOT NULL, retain INTEGER NOT NULL, PRIMARY KEY (client_id, seq)) WITHOUT ROWID`);
  const insert = db.prepare("INSERT OR REPLACE INTO outgoing (client_id, seq, topic, payload, qos, retain) VALUES (?, ?, ?, ?, ?, ?)");
  const remove = db.prepare("DELETE FROM outgoing WHERE client_id = ? AND seq = ?");
  const pendingAdds = new Map<string, QueueRow>();
  let pendingRemoves: [string, number][] = [];
  let scheduled = false;
  let closed = false;
  let writeErrors = 0;

  const commit = db.transaction(() => {
    for (const r of pendingAdds.values()) insert.run(r.clientId, r.seq, r.topic, r.payload, r.qos, r.retain ? 1 : 0);
    for (const [clientId, seq] of pendingRemoves) remove.run(clientId, seq);
  });

  function flush() {
    scheduled = false;
    if (closed || (pendingAdds.size === 0 && pendingRemoves.length === 0)) return;
    try {
      commit.immediate();
    } catch (e) {
      // Kept in memory all the same; only a restart before the next good write would lose these.
      writeErrors++;
      log(`queue file write failed: ${(e as Error).message}`);
    }
    pendingAdds.clear();
    pendingRemoves = [];
  }
  function schedule() {
    if (scheduled) return;
    scheduled = true;
    setImmediate(flush);
  }

  return {
    load() {
      const rows = db
        .prepare("SELECT client_id AS clientId, seq, topic, payload, qos, retain FROM outgoing ORDER BY client_id, seq")
        .all() as (Omit<QueueRow, "retain"> & { retain: number })[];
      return rows.map((r) => ({ ...r, retain: r.retain === 1 }));
    },
    added(clientId, seq, p) {
      pendingAdds.set(`${clientId}\u0000${seq}`, { clientId, seq, topic: p.topic, payload: p.payload, qos: p.qos, retain: !!p.retain });
      schedule();
    },
    removed(clientId, seq) {
      // Acknowledged before it was written: nothing to write either way.
      if (pendingAdds.delete(`${clientId}\u0000${seq}`)) return;
      pendingRemoves.push([clientId, seq]);
      schedule();
    },
    flush,
    close() {
      if (closed) return;
      flush();
      closed = true;
      db.close();
    },
    get writeErrors() {
      return writeErrors;
    },
  };
}
