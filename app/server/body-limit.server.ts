import { data } from "react-router";

/** Urlencoded forms are a few fields; 64 KiB leaves room for a long note. */
export const FORM_BODY_LIMIT = 64 * 1024;
/** Multipart forms carry a CSV import (blades) and nothing larger. */
export const MULTIPART_FORM_LIMIT = 2 * 1024 * 1024;
/** JSON bodies of the bench API (readings, imports). */
export const JSON_BODY_LIMIT = 2 * 1024 * 1024;

export class BodyTooLargeError extends Error {
  constructor(readonly limit: number) {
    super(`The request body is larger than ${Math.round(limit / 1024)} KiB.`);
  }
}

/** Refuses from the Content-Length header alone, before a byte of the body is read. */
export function checkDeclaredLength(request: Request, limit: number) {
  const declared = request.headers.get("content-length");
  if (declared !== null && /^\d+$/.test(declared) && Number(declared) > limit) throw new BodyTooLargeError(limit);
}

/**
 * The body's bytes, at most `limit` of them: the header is checked first, then the
 * stream is counted as it arrives (a chunked or lying sender is cut off at the limit).
 */
export async function readBodyLimited(request: Request, limit: number): Promise<Uint8Array<ArrayBuffer>> {
  checkDeclaredLength(request, limit);
  if (!request.body) return new Uint8Array(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => {});
      throw new BodyTooLargeError(limit);
    }
    chunks.push(value);
  }
  const bytes = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    bytes.set(c, at);
    at += c.byteLength;
  }
  return bytes;
}

/** The media type of a Content-Type header, parsed (no parameters, lower case), or "". */
export function mediaType(header: string | null): string {
  if (!header) return "";
  return header.split(";", 1)[0].trim().toLowerCase();
}

/** A 413 a form action throws (React Router renders it as the error page). */
export function tooLarge(error: BodyTooLargeError) {
  return data(error.message, { status: 413 });
}
