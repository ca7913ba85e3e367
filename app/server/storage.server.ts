import { GetObjectCommand, PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import { createHash, randomUUID } from "node:crypto";
import { env } from "./env.server.ts";

let client: S3Client | undefined;

function s3(): S3Client {
  if (!client) {
    const e = env();
    client = new S3Client({
      region: e.S3_REGION,
      endpoint: e.S3_ENDPOINT,
      // Path-style and checksums only when required: local fakes need both; real S3 accepts them.
      forcePathStyle: !!e.S3_ENDPOINT,
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
      credentials: e.S3_ACCESS_KEY_ID && e.S3_SECRET_ACCESS_KEY ? { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY } : undefined,
    });
  }
  return client;
}

export const MAX_IMAGE_BYTES = 8 * 1024 * 1024;

/** The image type a file really is, read from its first bytes (not from its name or the browser's claim). */
export function sniffImageType(head: Uint8Array): "image/jpeg" | "image/png" | "image/webp" | null {
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return "image/jpeg";
  if (head.length >= 8 && [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a].every((b, i) => head[i] === b)) return "image/png";
  if (head.length >= 12 && String.fromCharCode(...head.slice(0, 4)) === "RIFF" && String.fromCharCode(...head.slice(8, 12)) === "WEBP") return "image/webp";
  return null;
}

/** Stores bytes under a random key that says nothing about the blade, study or lab. */
export async function putObject(bytes: Uint8Array, contentType: string) {
  const key = `f/${randomUUID()}`;
  await s3().send(new PutObjectCommand({ Bucket: env().S3_BUCKET, Key: key, Body: bytes, ContentType: contentType, ContentLength: bytes.byteLength }));
  return { key, sha256: createHash("sha256").update(bytes).digest("hex") };
}

export async function getObject(key: string): Promise<{ body: ReadableStream; contentType: string; length?: number }> {
  const out = await s3().send(new GetObjectCommand({ Bucket: env().S3_BUCKET, Key: key }));
  if (!out.Body) throw new Error(`object ${key} has no body`);
  return { body: out.Body.transformToWebStream(), contentType: out.ContentType ?? "application/octet-stream", length: out.ContentLength };
}
