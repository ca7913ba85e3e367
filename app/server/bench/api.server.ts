import type { z } from "zod";
import { isStudyFrozenError } from "../db-errors.server.ts";
import { BodyTooLargeError, JSON_BODY_LIMIT, mediaType, readBodyLimited } from "../body-limit.server.ts";

/** A request the bench cannot do now, with a message the tester or lead can act on. */
export class BenchError extends Error {
  constructor(
    message: string,
    readonly status: 400 | 403 | 404 | 409 | 413 | 415 | 422 = 400,
    readonly issues: { path: string; message: string }[] = [],
  ) {
    super(message);
  }
}

export type ApiIssue = { path: string; message: string };

export function jsonError(error: string, status: number, issues: ApiIssue[] = []) {
  return Response.json({ error, issues }, { status, headers: { "Cache-Control": "no-store" } });
}

export function zodIssues(error: z.ZodError): ApiIssue[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join("."), message: i.message }));
}

/** Reads a JSON body, or a 400 in words. */
export async function readJson(request: Request): Promise<unknown> {
  // The media type is parsed: "text/plain; x=application/json" is not JSON.
  if (mediaType(request.headers.get("content-type")) !== "application/json") throw new BenchError("Send the body as JSON (Content-Type: application/json)", 415);
  let bytes: Uint8Array;
  try {
    bytes = await readBodyLimited(request, JSON_BODY_LIMIT);
  } catch (error) {
    if (error instanceof BodyTooLargeError) throw new BenchError(`The body is larger than ${JSON_BODY_LIMIT / 1024 / 1024} MB`, 413);
    throw new BenchError("The body could not be read");
  }
  try {
    return JSON.parse(new TextDecoder().decode(bytes));
  } catch {
    throw new BenchError("The body is not valid JSON");
  }
}

/**
 * Runs a JSON resource route: every refusal becomes `{ error, issues }` with its 4xx,
 * including the access helpers' thrown responses (sign-in redirect → 401, 403, 404),
 * and the database's own refusal of a study that is not running (BC409 → 409).
 */
export async function jsonRoute(handler: () => Promise<Response>): Promise<Response> {
  try {
    return await handler();
  } catch (error) {
    if (error instanceof BenchError) return jsonError(error.message, error.status, error.issues);
    if (isStudyFrozenError(error)) return jsonError("The study is not running: readings and events are closed.", 409);
    if (error instanceof Response) {
      if (error.status >= 300 && error.status < 400) return jsonError("Sign in first.", 401);
      return jsonError(error.statusText || "Refused", error.status);
    }
    const e = error as { type?: string; data?: unknown; init?: { status?: number } | null };
    if (e && e.type === "DataWithResponseInit") {
      return jsonError(typeof e.data === "string" ? e.data : "Refused", e.init?.status ?? 400);
    }
    throw error;
  }
}
