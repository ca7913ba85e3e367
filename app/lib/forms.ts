import type { z } from "zod";

export type FieldErrors = Record<string, string>;
export type FormFailure = { ok: false; errors: FieldErrors; values: Record<string, string>; formError?: string };

/** Parses a submitted form with a zod schema: the data, or field messages and the entered values. */
export function parseForm<S extends z.ZodType>(schema: S, form: FormData): { ok: true; data: z.infer<S> } | FormFailure {
  const values: Record<string, string> = {};
  for (const [key, value] of form) if (typeof value === "string" && !/password/i.test(key)) values[key] = value;
  const raw: Record<string, unknown> = {};
  for (const key of new Set(form.keys())) {
    const all = form.getAll(key);
    raw[key] = all.length > 1 ? all : all[0];
  }
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, data: parsed.data };
  const errors: FieldErrors = {};
  for (const issue of parsed.error.issues) {
    const field = issue.path.length ? issue.path.join(".") : "_form";
    errors[field] ??= issue.message;
  }
  return { ok: false, errors, values, formError: errors._form };
}

export function formFailure(values: Record<string, string>, errors: FieldErrors, formError?: string): FormFailure {
  return { ok: false, errors, values, formError };
}
