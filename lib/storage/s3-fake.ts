import fs from "node:fs";
import type { AddressInfo } from "node:net";
import S3rver from "s3rver";

// A local S3-compatible store for the demo and the tests (s3rver): listens on the loopback interface only and keeps
// objects as files under `directory`. Airkeep talks to it through the same S3 client as to a real store.

export type S3Fake = { url: string; port: number; close(): Promise<void> };

export async function startS3Fake(opts: { host?: string; port?: number; directory: string; bucket: string }): Promise<S3Fake> {
  fs.mkdirSync(opts.directory, { recursive: true });
  const host = opts.host ?? "127.0.0.1";
  const server = new S3rver({
    address: host,
    port: opts.port ?? 4569,
    silent: true,
    directory: opts.directory,
    configureBuckets: [{ name: opts.bucket }],
    // Path-style only: a vhost bucket would need DNS names the loopback interface does not have.
    vhostBuckets: false,
  });
  const address = (await server.run()) as AddressInfo;
  return {
    url: `http://${host}:${address.port}`,
    port: address.port,
    close: () => server.close(),
  };
}
