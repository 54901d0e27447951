// The aedes persistence conformance suite (shipped with aedes's own store) run against FastMemoryPersistence.
// Started by broker-persistence.test.ts with `node --import tsx --test`.
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { test } from "node:test";
import { FastMemoryPersistence } from "@/lib/broker/persistence";
import { openQueueFile } from "@/lib/broker/queue-file";

// Resolved from aedes's own location: the suite is a dependency of aedes, not of Airkeep.
const fromAedes = createRequire(path.join(path.dirname(fileURLToPath(import.meta.resolve("aedes"))), "package.json"));
const abstract = fromAedes("aedes-persistence/abstract.js") as (opts: unknown) => void;

abstract({ test, persistence: () => new FastMemoryPersistence(), testAsync: true });
// Again with the queues mirrored to a queue file (an in-memory SQLite database here).
abstract({ test, persistence: () => new FastMemoryPersistence({ queueFile: openQueueFile(":memory:") }), testAsync: true });
