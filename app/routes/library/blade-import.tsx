import { Form, Link, data, redirect } from "react-router";
import type { Route } from "./+types/blade-import";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { LibraryNav } from "~/components/table.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { BLADE_CSV_COLUMNS, commitBladeImport, previewBladeImport, type ImportPreview } from "~/server/library.server.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Import blades · Blindcut" }];

const MAX_CSV_BYTES = 1024 * 1024;

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab, columns: BLADE_CSV_COLUMNS.map(([csv]) => csv) };
}

type ImportResult = { preview: ImportPreview | null; csv: string; formError?: string };

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const length = Number(request.headers.get("content-length") ?? 0);
  if (length > MAX_CSV_BYTES * 2) return data<ImportResult>({ preview: null, csv: "", formError: "The file is larger than 1 MB: split it into smaller imports" }, { status: 413 });
  const form = await readFormData(request);
  const file = form.get("file");
  const csv = typeof file === "object" && file && "text" in file ? await file.text() : String(form.get("csv") ?? "");
  if (!csv.trim()) return data<ImportResult>({ preview: null, csv: "", formError: "Choose a CSV file to import" }, { status: 400 });
  if (csv.length > MAX_CSV_BYTES) return data<ImportResult>({ preview: null, csv: "", formError: "The file is larger than 1 MB: split it into smaller imports" }, { status: 413 });
  if (form.get("intent") === "commit") {
    const result = await commitBladeImport(lab.id, user.id, csv);
    if (result.ok) return redirect(`/labs/${lab.id}/blades?imported=${result.created}`);
    return data<ImportResult>({ preview: result.preview, csv, formError: "Nothing was imported: fix the rows below and try again." }, { status: 400 });
  }
  const preview = await previewBladeImport(lab.id, csv);
  return data<ImportResult>({ preview, csv }, { status: preview.errors.length ? 400 : 200 });
}

export default function ImportBlades({ loaderData, actionData }: Route.ComponentProps) {
  const preview = actionData?.preview;
  return (
    <div>
      <LibraryNav labId={loaderData.lab.id} />
      <PageTitle lead="Upload a CSV, check the preview, then import. Every row is imported, or none.">Import blades from CSV</PageTitle>
      <details className="mb-6 rounded border border-rule bg-card p-4">
        <summary className="cursor-pointer font-bold">The CSV layout</summary>
        <p className="mt-2">
          A header row with these columns (only <code>inventory_number</code> and <code>steel</code> are required): <code className="break-words">{loaderData.columns.join(", ")}</code>.
          Lengths in mm, angles in degrees per side, hardness as Rockwell C readings separated by spaces, status one of in_lab, out, retired.
        </p>
      </details>
      <FormAlert message={actionData?.formError} />
      <Form method="post" encType="multipart/form-data" className="my-4 flex flex-wrap items-end gap-4">
        <div className="flex flex-col gap-1">
          <label htmlFor="csv-file" className="font-bold">CSV file</label>
          <input id="csv-file" name="file" type="file" accept=".csv,text/csv" className="min-h-target" />
        </div>
        <SubmitButton intent="preview">Preview</SubmitButton>
      </Form>
      {preview ? (
        <section aria-labelledby="preview-title" className="mt-6">
          <h2 id="preview-title" className="text-xl font-bold">
            Preview: {preview.rows.length} valid row{preview.rows.length === 1 ? "" : "s"}, {preview.errors.length} error{preview.errors.length === 1 ? "" : "s"}
          </h2>
          {preview.unknownColumns.length ? <p className="text-graphite-600">Ignored columns: {preview.unknownColumns.join(", ")}</p> : null}
          {preview.errors.length ? (
            <table className="mt-3 w-full border-collapse text-left" data-testid="import-errors">
              <thead>
                <tr className="border-b-2 border-fault">
                  <th scope="col" className="py-1">Row</th>
                  <th scope="col" className="py-1">Column</th>
                  <th scope="col" className="py-1">Problem</th>
                </tr>
              </thead>
              <tbody>
                {preview.errors.map((e, i) => (
                  <tr key={i} className="border-b border-rule">
                    <td className="figures py-1">{e.row}</td>
                    <td className="py-1">{e.column || "—"}</td>
                    <td className="py-1 text-fault">{e.message}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : (
            <>
              <table className="mt-3 w-full border-collapse text-left">
                <thead>
                  <tr className="border-b-2 border-graphite-800">
                    <th scope="col" className="py-1">Row</th>
                    <th scope="col" className="py-1">Inventory number</th>
                    <th scope="col" className="py-1">Steel</th>
                    <th scope="col" className="py-1">Hardness (HRC)</th>
                  </tr>
                </thead>
                <tbody>
                  {preview.rows.map((r) => (
                    <tr key={r.row} className="border-b border-rule">
                      <td className="figures py-1">{r.row}</td>
                      <td className="py-1">{r.value.inventoryNumber}</td>
                      <td className="py-1">{r.value.steel}</td>
                      <td className="figures py-1">{r.value.hardnessHrc.join(", ")}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <Form method="post" className="mt-4">
                <input type="hidden" name="csv" value={actionData?.csv} />
                <SubmitButton intent="commit">Import {preview.rows.length} blades</SubmitButton>
              </Form>
            </>
          )}
        </section>
      ) : null}
      <p className="mt-8">
        <Link to={`/labs/${loaderData.lab.id}/blades`}>Back to the blades</Link>
      </p>
    </div>
  );
}
