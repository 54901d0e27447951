import path from "node:path";
import { databasePath } from "@/db/client";

type Env = Record<string, string | undefined>;

// File-store settings from the environment. Unset S3_URL means the built-in S3 fake (lib/storage/main.ts) on
// S3_HOST:S3_PORT, keeping its files in <data folder>/files.

export type StorageConfig = {
  endpoint: string;
  useFake: boolean;
  fakeHost: string;
  fakePort: number;
  fakeDirectory: string;
  bucket: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
  /** Path-style addresses (http://host/bucket/key): what the fake and most self-hosted stores want. */
  forcePathStyle: boolean;
};

/** The fake's fixed credentials (s3rver accepts only these); it listens on the loopback interface only. */
export const FAKE_CREDENTIALS = { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" } as const;

export function storageConfigFromEnv(env: Env = process.env): StorageConfig {
  const fakeHost = env.S3_HOST?.trim() || "127.0.0.1";
  const rawPort = env.S3_PORT?.trim() || "4569";
  const fakePort = Number(rawPort);
  if (!Number.isInteger(fakePort) || fakePort < 0 || fakePort > 65535) throw new Error(`S3_PORT=${rawPort} is not a port number`);
  const given = env.S3_URL?.trim();
  if (given && !/^https?:\/\//.test(given)) throw new Error(`S3_URL=${given} must start with http:// or https://`);
  const bucket = env.S3_BUCKET?.trim() || "airkeep";
  if (!/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/.test(bucket)) throw new Error(`S3_BUCKET=${bucket} is not a valid bucket name`);
  return {
    endpoint: given || `http://${fakeHost}:${fakePort}`,
    useFake: !given,
    fakeHost,
    fakePort,
    fakeDirectory: env.S3_FAKE_DIR?.trim() || path.join(path.dirname(databasePath(env.DATABASE_URL)), "files"),
    bucket,
    region: env.S3_REGION?.trim() || "us-east-1",
    accessKeyId: given ? (env.S3_ACCESS_KEY ?? "") : FAKE_CREDENTIALS.accessKeyId,
    secretAccessKey: given ? (env.S3_SECRET_KEY ?? "") : FAKE_CREDENTIALS.secretAccessKey,
    forcePathStyle: env.S3_FORCE_PATH_STYLE !== "false",
  };
}
