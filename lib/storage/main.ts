import { storageConfigFromEnv } from "./config";
import { startS3Fake } from "./s3-fake";

// Node only: the built-in S3 fake, started by `npm run demo` and `npm start` when S3_URL is unset.

const config = storageConfigFromEnv();
const fake = await startS3Fake({ host: config.fakeHost, port: config.fakePort, directory: config.fakeDirectory, bucket: config.bucket });
console.log(`[storage] S3 fake listening on ${fake.url}, bucket "${config.bucket}", files under ${config.fakeDirectory}`);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[storage] ${signal}: stopping`);
  const force = setTimeout(() => process.exit(1), 5_000);
  try {
    await fake.close();
  } finally {
    clearTimeout(force);
    process.exit(0);
  }
}
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
