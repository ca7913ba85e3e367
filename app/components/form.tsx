import { useNavigation } from "react-router";
import { useId } from "react";

type FieldProps = {
  label: string;
  name: string;
  type?: string;
  defaultValue?: string;
  error?: string;
  hint?: string;
  autoComplete?: string;
  required?: boolean;
  unit?: string;
  inputMode?: React.HTMLAttributes<HTMLInputElement>["inputMode"];
  /** The id of a <datalist> of suggestions. */
  list?: string;
};

/** A labelled input with its hint and its error message tied to it for screen readers. */
export function Field({ label, name, type = "text", defaultValue, error, hint, autoComplete, required, unit, inputMode, list }: FieldProps) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
        {unit ? <span className="font-normal text-graphite-600"> ({unit})</span> : null}
      </label>
      {hint ? (
        <p id={hintId} className="text-sm text-graphite-600">
          {hint}
        </p>
      ) : null}
      <input
        id={id}
        name={name}
        type={type}
        defaultValue={defaultValue}
        autoComplete={autoComplete}
        required={required}
        inputMode={inputMode}
        list={list}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`min-h-target rounded border bg-card px-3 text-base ${error ? "border-fault" : "border-graphite-400"}`}
      />
      {error ? (
        <p id={errorId} className="text-sm font-bold text-fault">
          <span aria-hidden="true">✕ </span>
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function SelectField({
  label,
  name,
  options,
  defaultValue,
  error,
}: {
  label: string;
  name: string;
  options: { value: string; label: string }[];
  defaultValue?: string;
  error?: string;
}) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      <select
        id={id}
        name={name}
        defaultValue={defaultValue}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="min-h-target rounded border border-graphite-400 bg-card px-3"
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error ? (
        <p id={`${id}-error`} className="text-sm font-bold text-fault">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function SubmitButton({ children, intent, tone = "primary" }: { children: React.ReactNode; intent?: string; tone?: "primary" | "quiet" | "danger" }) {
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" && (intent === undefined || navigation.formData?.get("intent") === intent);
  const tones = {
    primary: "bg-ink text-white hover:bg-ink-deep",
    quiet: "border border-graphite-400 bg-card text-graphite-950 hover:bg-paper-deep",
    danger: "border border-fault bg-card text-fault hover:bg-fault-soft",
  };
  return (
    <button
      type="submit"
      name={intent ? "intent" : undefined}
      value={intent}
      disabled={busy}
      className={`inline-flex min-h-target items-center justify-center rounded px-4 font-bold disabled:opacity-60 ${tones[tone]}`}
    >
      {busy ? "Working…" : children}
    </button>
  );
}

export function FormAlert({ message, tone = "fault" }: { message?: string; tone?: "fault" | "ok" }) {
  if (!message) return null;
  const cls = tone === "ok" ? "border-ok bg-ok-soft text-ok" : "border-fault bg-fault-soft text-fault";
  return (
    <div role={tone === "ok" ? "status" : "alert"} className={`rounded border-l-4 p-3 font-bold ${cls}`}>
      {message}
    </div>
  );
}

export function PageTitle({ children, lead }: { children: React.ReactNode; lead?: React.ReactNode }) {
  return (
    <div className="mb-6">
      <h1 className="text-3xl font-bold">{children}</h1>
      {lead ? <p className="mt-2 max-w-prose text-graphite-800">{lead}</p> : null}
    </div>
  );
}
