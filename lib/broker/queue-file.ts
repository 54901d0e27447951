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
  /** Everything still queued, in the order it was queued. */
  load(): QueueRow[];
  /** `seq` is unique across clients and increasing. */
  added(clientId: string, seq: number, packet: Omit<QueuedPacket, "retain"> & { retain?: boolean }): void;
  removed(seq: number): void;
  /** Commits what is pending now. */
  flush(): void;
  close(): void;
  readonly writeErrors: number;
};

const ROWS_PER_INSERT = 64;

export function openQueueFile(file: string, log: (msg: string) => void = () => {}): QueueFile {
  if (file !== ":memory:") fs.mkdirSync(path.dirname(file), { recursive: true });
  const db = new Database(file);
  db.pragma("journal_mode = WAL");
  db.pragma("synchronous = NORMAL");
  // The sequence is the row id: new rows append at the end of the table and acknowledged runs go in one range.
  db.exec(`CREATE TABLE IF NOT EXISTS outgoing (seq INTEGER PRIMARY KEY, client_id TEXT NOT NULL, topic TEXT NOT NULL,
    payload BLOB NOT NULL, qos INTEGER NOT NULL, retain INTEGER NOT NULL)`);
  const insertSql = (n: number) =>
    `INSERT OR REPLACE INTO outgoing (seq, client_id, topic, payload, qos, retain) VALUES ${Array(n).fill("(?, ?, ?, ?, ?, ?)").join(", ")}`;
  const insertMany = db.prepare(insertSql(ROWS_PER_INSERT));
  const insertOne = db.prepare(insertSql(1));
  const removeRange = db.prepare("DELETE FROM outgoing WHERE seq BETWEEN ? AND ?");
  const pendingAdds = new Map<number, QueueRow>();
  let pendingRemoves: number[] = [];
  let scheduled = false;
  let closed = false;
  let writeErrors = 0;

  const params = (r: QueueRow) => [r.seq, r.clientId, r.topic, r.payload, r.qos, r.retain ? 1 : 0];
  const commit = db.transaction(() => {
    const rows = [...pendingAdds.values()];
    let i = 0;
    for (; i + ROWS_PER_INSERT <= rows.length; i += ROWS_PER_INSERT) insertMany.run(rows.slice(i, i + ROWS_PER_INSERT).flatMap(params));
    for (; i < rows.length; i++) insertOne.run(params(rows[i]!));
    // Acknowledgements come mostly in order: consecutive sequence numbers go as one range.
    const seqs = pendingRemoves.sort((x, y) => x - y);
    for (let j = 0; j < seqs.length; ) {
      let k = j;
      while (k + 1 < seqs.length && seqs[k + 1] === seqs[k]! + 1) k++;
      removeRange.run(seqs[j], seqs[k]);
      j = k + 1;
    }
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
        .prepare("SELECT client_id AS clientId, seq, topic, payload, qos, retain FROM outgoing ORDER BY seq")
        .all() as (Omit<QueueRow, "retain"> & { retain: number })[];
      return rows.map((r) => ({ ...r, retain: r.retain === 1 }));
    },
    added(clientId, seq, p) {
      pendingAdds.set(seq, { clientId, seq, topic: p.topic, payload: p.payload, qos: p.qos, retain: !!p.retain });
      schedule();
    },
    removed(seq) {
      // Acknowledged before it was written: nothing to write either way.
      if (pendingAdds.delete(seq)) return;
      pendingRemoves.push(seq);
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
