// Writes docs/bundle.schema.json, the JSON Schema of the reproducibility bundle, from its zod schema.
import { writeFileSync } from "node:fs";
import path from "node:path";
import { z } from "zod";
import { BundleSchema } from "../app/domain/bundle.ts";

export function bundleJsonSchema() {
  return { ...z.toJSONSchema(BundleSchema, { target: "draft-2020-12" }), $id: "https://blindcut.invalid/schema/study-bundle-v1.json", title: "Blindcut study bundle, format version 1" };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  writeFileSync(path.resolve(import.meta.dirname, "../docs/bundle.schema.json"), JSON.stringify(bundleJsonSchema(), null, 2) + "\n");
  console.log("[blindcut] docs/bundle.schema.json written");
}
