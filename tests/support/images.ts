// Small real image files for upload tests.
// A 1×1 PNG (the smallest valid PNG: signature, IHDR, IDAT, IEND).
export const TINY_PNG = Buffer.from(
  "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==",
  "base64",
);

export function multipartWithFile(field: string, name: string, type: string, bytes: Uint8Array<ArrayBuffer>) {
  const form = new FormData();
  form.append(field, new Blob([bytes], { type }), name);
  return form;
}
