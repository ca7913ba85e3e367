import { data } from "react-router";
import { BodyTooLargeError, FORM_BODY_LIMIT, MULTIPART_FORM_LIMIT, mediaType, readBodyLimited, tooLarge } from "./body-limit.server.ts";

/**
 * The request's form body, or a 4xx in words: a body over the form limit is a 413
 * (refused from the header before reading, else cut off while streaming); a body that
 * is not a form (JSON sent to a form action, a broken multipart stream) is a 400.
 */
export async function readFormData(request: Request): Promise<FormData> {
  const type = mediaType(request.headers.get("content-type"));
  const limit = type === "multipart/form-data" ? MULTIPART_FORM_LIMIT : FORM_BODY_LIMIT;
  let bytes: Uint8Array;
  try {
    bytes = await readBodyLimited(request, limit);
  } catch (error) {
    if (error instanceof BodyTooLargeError) throw tooLarge(error);
    throw data("The request body could not be read.", { status: 400 });
  }
  try {
    return await new Response(bytes as Uint8Array<ArrayBuffer>, { headers: { "Content-Type": request.headers.get("content-type") ?? "" } }).formData();
  } catch {
    throw data("The request body is not a form: send it as application/x-www-form-urlencoded or multipart/form-data.", { status: 400 });
  }
}
