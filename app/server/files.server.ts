import { and, eq } from "drizzle-orm";
import { parseFormData, MaxFilesExceededError, type FileUpload } from "@remix-run/form-data-parser";
import { MaxFileSizeExceededError } from "@remix-run/multipart-parser";
import { db } from "./db.server.ts";
import { mediaType } from "./body-limit.server.ts";
import { storedFiles } from "./db/schema/index.ts";
import { MAX_IMAGE_BYTES, putObject, sniffImageType, getObject } from "./storage.server.ts";

export class UploadError extends Error {
  constructor(
    message: string,
    readonly status = 400,
  ) {
    super(message);
  }
}

/**
 * Receives one image from a multipart request, streaming: the parser stops at the
 * size limit, so an oversize file is never held or stored whole. The content is
 * checked by its first bytes; the object key is random.
 */
export async function receiveImage(request: Request, labId: string, userId: string) {
  if (mediaType(request.headers.get("content-type")) !== "multipart/form-data") throw new UploadError("Send the photo as a multipart form upload", 415);
  // A declared length beyond the photo limit (plus room for the form's boundaries) is refused unread.
  const declared = Number(request.headers.get("content-length") ?? "0");
  if (declared > MAX_IMAGE_BYTES + 64 * 1024) throw new UploadError(`The photo is larger than ${MAX_IMAGE_BYTES / 1024 / 1024} MB. Choose a smaller image.`, 413);
  let file: FileUpload | undefined;
  try {
    await parseFormData(request, { maxFiles: 1, maxFileSize: MAX_IMAGE_BYTES }, async (upload) => {
      if (upload.fieldName === "file") file = upload;
      return null;
    });
  } catch (error) {
    if (error instanceof MaxFileSizeExceededError || (error as Error)?.name === "MaxFileSizeExceededError" || (error as { cause?: Error })?.cause instanceof MaxFileSizeExceededError) throw new UploadError(`The photo is larger than ${MAX_IMAGE_BYTES / 1024 / 1024} MB. Choose a smaller image.`, 413);
    if (error instanceof MaxFilesExceededError) throw new UploadError("Send one photo at a time");
    // Any other parse failure is a malformed upload from the sender, not a server fault.
    throw new UploadError("The upload could not be read. Try again.");
  }
  if (!file || file.size === 0) throw new UploadError("Choose a photo to upload");
  const bytes = new Uint8Array(await file.arrayBuffer());
  const type = sniffImageType(bytes.subarray(0, 16));
  if (!type) throw new UploadError("That file is not a JPEG, PNG or WebP image", 415);
  const { key, sha256 } = await putObject(bytes, type);
  const [row] = await db()
    .insert(storedFiles)
    .values({ labId, storageKey: key, contentType: type, byteSize: bytes.byteLength, sha256, uploadedBy: userId })
    .returning({ id: storedFiles.id });
  return { fileId: row.id, contentType: type, byteSize: bytes.byteLength };
}

/** A file of this lab, or null: another lab's file id finds nothing. */
export async function fileOfLab(labId: string, fileId: string) {
  const [row] = await db().select().from(storedFiles).where(and(eq(storedFiles.id, fileId), eq(storedFiles.labId, labId)));
  return row ?? null;
}

export async function fileResponse(file: { storageKey: string; contentType: string }) {
  const object = await getObject(file.storageKey);
  return new Response(object.body, {
    headers: {
      "Content-Type": file.contentType,
      "Cache-Control": "private, max-age=3600",
      "Content-Disposition": "inline",
      "X-Content-Type-Options": "nosniff",
    },
  });
}
