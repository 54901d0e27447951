import type { Readable } from "node:stream";
import { DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, S3Client, S3ServiceException } from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { storageConfigFromEnv, type StorageConfig } from "./config";

// The one place Airkeep talks to the object store. Objects are private; people reach them only through the app.

export type ObjectStore = {
  bucket: string;
  /** Streams body into the store; at most one 5 MB part is held in memory at a time. */
  put(key: string, body: Readable, contentType: string, signal?: AbortSignal): Promise<void>;
  /** The object's bytes as a stream, or null when the key does not exist. */
  get(key: string): Promise<{ body: Readable; size: number | null } | null>;
  remove(key: string): Promise<void>;
  /** Whether the bucket answers (health, tests). */
  ping(): Promise<boolean>;
  close(): void;
};

const PART_BYTES = 5 * 1024 * 1024;

export function createObjectStore(config: StorageConfig): ObjectStore {
  const client = new S3Client({
    endpoint: config.endpoint,
    region: config.region,
    forcePathStyle: config.forcePathStyle,
    credentials: { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey },
    // A store that is down must fail an upload quickly, not hang the form.
    maxAttempts: 2,
  });
  const bucket = config.bucket;
  return {
    bucket,
    async put(key, body, contentType, signal) {
      const upload = new Upload({
        client,
        params: { Bucket: bucket, Key: key, Body: body, ContentType: contentType },
        partSize: PART_BYTES,
        queueSize: 1,
        leavePartsOnError: false,
      });
      const abort = () => void upload.abort();
      signal?.addEventListener("abort", abort, { once: true });
      try {
        await upload.done();
      } finally {
        signal?.removeEventListener("abort", abort);
      }
    },
    async get(key) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
        return { body: out.Body as Readable, size: out.ContentLength ?? null };
      } catch (e) {
        if (e instanceof S3ServiceException && (e.name === "NoSuchKey" || e.$metadata.httpStatusCode === 404)) return null;
        throw e;
      }
    },
    async remove(key) {
      await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }));
    },
    async ping() {
      try {
        await client.send(new HeadBucketCommand({ Bucket: bucket }));
        return true;
      } catch {
        return false;
      }
    },
    close: () => client.destroy(),
  };
}

const globalForStore = globalThis as unknown as { airkeepObjectStore?: ObjectStore };

/** The process-wide store from the environment's settings. */
export function getObjectStore(): ObjectStore {
  globalForStore.airkeepObjectStore ??= createObjectStore(storageConfigFromEnv());
  return globalForStore.airkeepObjectStore;
}
