// A local fake S3 server (s3rver) on loopback with the app's bucket created.
import S3rver from "s3rver";
import { mkdirSync } from "node:fs";

export async function startS3Fake(options: { port: number; dir: string; bucket: string }) {
  mkdirSync(options.dir, { recursive: true });
  const server = new S3rver({
    address: "127.0.0.1",
    port: options.port,
    directory: options.dir,
    silent: true,
    configureBuckets: [{ name: options.bucket, configs: [] }],
  });
  const address = (await server.run()) as { port: number };
  return { port: address.port, close: () => server.close() };
}
