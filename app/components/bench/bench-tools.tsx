// The run page's other tools: events at a cut (with an edge photo), and CSV import of readings.
import { useState } from "react";
import type { BenchRunView } from "~/server/bench/runs.server.ts";
import { PhotoUpload } from "~/components/photo-upload.tsx";
import { csvHeaders } from "~/domain/bench/readings-csv.ts";
import { GF_PER_NEWTON } from "~/domain/bench/units.ts";
import { newKey } from "~/lib/bench/keys.ts";

const KINDS = [
  ["chip", "Chip"],
  ["rolled_edge", "Rolled edge"],
  ["media_change", "Media change"],
  ["other", "Other"],
] as const;

export function BenchTools({ labId, view, attempt, ended, lastCheck, onImported }: { labId: string; view: BenchRunView; attempt: number; ended: boolean; lastCheck: number | null; onImported: () => void }) {
  if (ended) return null;
  return (
    <div className="flex flex-col gap-4">
      <EventForm labId={labId} runId={view.run.id} lastCheck={lastCheck} onSaved={onImported} />
      <CsvImport labId={labId} view={view} attempt={attempt} onImported={onImported} />
    </div>
  );
}

function EventForm({ labId, runId, lastCheck, onSaved }: { labId: string; runId: string; lastCheck: number | null; onSaved: () => void }) {
  const [kind, setKind] = useState<string>("chip");
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const [formKey, setFormKey] = useState(0);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const cut = Number(form.get("cut"));
    setBusy(true);
    try {
      const res = await fetch(`/labs/${labId}/api/runs/${runId}/events`, {
        method: "POST",
        headers: { "Content-Type": "application/json", Accept: "application/json" },
        body: JSON.stringify({ idempotencyKey: newKey(), kind, cut: Number.isFinite(cut) ? cut : -1, note: String(form.get("note") ?? ""), photoFileId: form.get("photoFileId") || null }),
      });
      const body = (await res.json().catch(() => null)) as { error?: string; issues?: { message: string }[] } | null;
      if (res.ok) {
        setMessage({ ok: true, text: "Event recorded." });
        setFormKey((k) => k + 1);
        onSaved();
      } else setMessage({ ok: false, text: [body?.error, ...(body?.issues ?? []).map((i) => i.message)].filter(Boolean).join(" ") || `Not recorded (${res.status}).` });
    } catch {
      setMessage({ ok: false, text: "No connection: the event was not recorded. Try again." });
    } finally {
      setBusy(false);
    }
  }
  return (
    <details className="rounded-lg border border-rule bg-card p-4">
      <summary className="min-h-target cursor-pointer text-lg font-bold">Record an event or an edge photo</summary>
      <form key={formKey} onSubmit={submit} className="mt-3 flex flex-col gap-3" noValidate>
        <fieldset className="flex flex-wrap gap-2">
          <legend className="mb-1 font-bold">What happened</legend>
          {KINDS.map(([value, label]) => (
            <label key={value} className={`flex min-h-target cursor-pointer items-center gap-2 rounded border px-3 ${kind === value ? "border-2 border-ink bg-paper font-bold" : "border-graphite-400"}`}>
              <input type="radio" name="kind" value={value} checked={kind === value} onChange={() => setKind(value)} className="h-5 w-5" />
              {label}
            </label>
          ))}
        </fieldset>
        <label className="flex flex-col gap-1 font-bold">
          At cut
          <input name="cut" inputMode="numeric" defaultValue={String(lastCheck ?? 0)} className="figures min-h-target w-28 rounded border border-graphite-400 bg-paper px-2 text-xl" />
        </label>
        <label className="flex flex-col gap-1 font-bold">
          Note {kind === "other" ? "(required)" : "(optional)"}
          <input name="note" className="min-h-target rounded border border-graphite-400 bg-paper px-2" />
        </label>
        <PhotoUpload uploadUrl={`/labs/${labId}/api/runs/${runId}/photos`} label="Edge photo" />
        {message ? (
          <p role={message.ok ? "status" : "alert"} className={`font-bold ${message.ok ? "text-ok" : "text-fault"}`}>
            {message.ok ? "✓ " : "✕ "}
            {message.text}
          </p>
        ) : null}
        <div>
          <button type="submit" disabled={busy} className="min-h-target rounded bg-ink px-4 font-bold text-white disabled:opacity-60">
            {busy ? "Recording…" : "Record the event"}
          </button>
        </div>
      </form>
    </details>
  );
}

type Preview = { committed: boolean; rows: { row: number; cut: number; position: string; kind: string; value: number }[]; errors: { row: number; column: string; message: string }[]; saved: number };

function CsvImport({ labId, view, onImported }: { labId: string; view: BenchRunView; attempt: number; onImported: () => void }) {
  const isForce = view.protocol.bench.kind === "edge_force";
  const [csv, setCsv] = useState("");
  const [layout, setLayout] = useState<"blindcut" | "mapped">("blindcut");
  const [mapping, setMapping] = useState({ cut: "", position: "", value: "", kind: "", unit: isForce ? "gf" : "mm" });
  const [preview, setPreview] = useState<Preview | null>(null);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const headers = csv ? csvHeaders(csv) : [];

  async function post(commit: boolean) {
    setMessage(null);
    const body = {
      csv,
      layout,
      commit,
      ...(layout === "mapped" ? { mapping: { cut: mapping.cut, position: mapping.position || null, value: mapping.value, kind: mapping.kind || null, unit: mapping.unit } } : {}),
    };
    try {
      const res = await fetch(`/labs/${labId}/api/runs/${view.run.id}/import`, { method: "POST", headers: { "Content-Type": "application/json", Accept: "application/json" }, body: JSON.stringify(body) });
      const json = (await res.json().catch(() => null)) as (Preview & { error?: string; preview?: Preview; issues?: { path: string; message: string }[] }) | null;
      if (res.ok && json) {
        setPreview(json);
        if (json.committed) {
          setMessage({ ok: true, text: `${json.saved} reading(s) imported.` });
          setCsv("");
          setPreview(null);
          onImported();
        }
      } else {
        if (json?.preview) setPreview(json.preview);
        setMessage({ ok: false, text: [json?.error, ...(json?.preview ? [] : (json?.issues ?? []).map((i) => `${i.path}: ${i.message}`))].filter(Boolean).join(" ") || `The import failed (${res.status}).` });
      }
    } catch {
      setMessage({ ok: false, text: "No connection: nothing was imported. Try again." });
    }
  }

  const select = (name: keyof typeof mapping, label: string, optional: boolean) => (
    <label className="flex flex-col gap-1 font-bold">
      {label}
      <select value={mapping[name]} onChange={(e) => setMapping((m) => ({ ...m, [name]: e.currentTarget.value }))} className="min-h-target rounded border border-graphite-400 bg-paper px-2">
        <option value="">{optional ? "(none)" : "Choose…"}</option>
        {headers.map((h) => (
          <option key={h} value={h}>{h}</option>
        ))}
      </select>
    </label>
  );

  return (
    <details className="rounded-lg border border-rule bg-card p-4">
      <summary className="min-h-target cursor-pointer text-lg font-bold">Import readings from a CSV file</summary>
      <div className="mt-3 flex flex-col gap-3">
        <p className="text-sm text-graphite-800">
          Blindcut's layout: a header row <code>{isForce ? "cut,position,kind,value_gf" : "stroke,depth_mm"}</code>
          {isForce ? " (kind: check or confirmation; may be left out)" : ""}. Any other export: choose its columns below. Every row is imported, or none.
        </p>
        <label className="flex flex-col gap-1 font-bold">
          CSV file
          <input
            type="file"
            accept=".csv,text/csv,text/plain"
            className="min-h-target font-normal"
            onChange={async (e) => {
              const file = e.currentTarget.files?.[0];
              if (file) {
                setCsv(await file.text());
                setPreview(null);
              }
            }}
          />
        </label>
        <label className="flex flex-col gap-1 font-bold">
          Or paste the CSV
          <textarea value={csv} onChange={(e) => { setCsv(e.currentTarget.value); setPreview(null); }} rows={4} className="figures rounded border border-graphite-400 bg-paper p-2 text-sm" />
        </label>
        <fieldset className="flex flex-wrap gap-2">
          <legend className="mb-1 font-bold">Layout</legend>
          {(["blindcut", "mapped"] as const).map((l) => (
            <label key={l} className={`flex min-h-target items-center gap-2 rounded border px-3 ${layout === l ? "border-2 border-ink font-bold" : "border-graphite-400"}`}>
              <input type="radio" checked={layout === l} onChange={() => setLayout(l)} className="h-5 w-5" />
              {l === "blindcut" ? "Blindcut's layout" : "Choose the columns"}
            </label>
          ))}
        </fieldset>
        {layout === "mapped" ? (
          <div className="grid gap-2 sm:grid-cols-2">
            {select("cut", isForce ? "Cut column" : "Stroke column", false)}
            {isForce ? select("position", "Position column", false) : null}
            {select("value", "Value column", false)}
            {isForce ? select("kind", "Kind column", true) : null}
            {isForce ? (
              <label className="flex flex-col gap-1 font-bold">
                Unit
                <select value={mapping.unit} onChange={(e) => setMapping((m) => ({ ...m, unit: e.currentTarget.value }))} className="min-h-target rounded border border-graphite-400 bg-paper px-2">
                  <option value="gf">gf</option>
                  <option value="N">N (× {GF_PER_NEWTON.toFixed(2)} → gf)</option>
                </select>
              </label>
            ) : null}
          </div>
        ) : null}
        <div className="flex flex-wrap gap-2">
          <button type="button" disabled={!csv} onClick={() => post(false)} className="min-h-target rounded border border-graphite-400 bg-card px-4 font-bold disabled:opacity-60">
            Preview
          </button>
          <button type="button" disabled={!preview || preview.errors.length > 0 || preview.rows.length === 0} onClick={() => post(true)} className="min-h-target rounded bg-ink px-4 font-bold text-white disabled:opacity-60">
            Import all rows
          </button>
        </div>
        {message ? (
          <p role={message.ok ? "status" : "alert"} className={`font-bold ${message.ok ? "text-ok" : "text-fault"}`}>
            {message.ok ? "✓ " : "✕ "}
            {message.text}
          </p>
        ) : null}
        {preview ? (
          <div className="flex flex-col gap-2" data-testid="import-preview">
            {preview.errors.length ? (
              <ul className="list-disc pl-5 text-fault">
                {preview.errors.map((e, i) => (
                  <li key={i}>
                    {e.row ? `Row ${e.row}` : "File"}
                    {e.column ? ` (${e.column})` : ""}: {e.message}
                  </li>
                ))}
              </ul>
            ) : (
              <p className="font-bold text-ok">✓ {preview.rows.length} row(s) read, no errors.</p>
            )}
            <ul className="figures max-h-48 overflow-y-auto text-sm">
              {preview.rows.map((r) => (
                <li key={r.row}>
                  row {r.row}: cut {r.cut}, {r.position}, {r.kind}, {r.value} {isForce ? "gf" : "mm"}
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </div>
    </details>
  );
}
