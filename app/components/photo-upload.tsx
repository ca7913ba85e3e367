import { useId, useState } from "react";

type State = { phase: "idle" } | { phase: "uploading"; percent: number } | { phase: "done"; fileId: string; name: string } | { phase: "failed"; message: string };

/**
 * Uploads a photo as soon as it is chosen, with progress (XMLHttpRequest: fetch
 * reports no upload progress), and puts the stored file's id into a hidden field
 * of the surrounding form.
 */
export function PhotoUpload({ uploadUrl, name = "photoFileId", label = "Photo" }: { uploadUrl: string; name?: string; label?: string }) {
  const id = useId();
  const [state, setState] = useState<State>({ phase: "idle" });

  function upload(file: File) {
    const body = new FormData();
    body.append("file", file);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", uploadUrl);
    xhr.setRequestHeader("Accept", "application/json");
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) setState({ phase: "uploading", percent: Math.round((e.loaded / e.total) * 100) });
    };
    xhr.onload = () => {
      let json: { fileId?: string; error?: string } = {};
      try {
        json = JSON.parse(xhr.responseText);
      } catch {
        // fall through to the generic message
      }
      if (xhr.status === 200 && json.fileId) setState({ phase: "done", fileId: json.fileId, name: file.name });
      else setState({ phase: "failed", message: json.error ?? `The upload failed (${xhr.status}). Try again.` });
    };
    xhr.onerror = () => setState({ phase: "failed", message: "The connection dropped during the upload. Try again." });
    setState({ phase: "uploading", percent: 0 });
    xhr.send(body);
  }

  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label} <span className="font-normal text-graphite-600">(JPEG, PNG or WebP, up to 8 MB)</span>
      </label>
      <input
        id={id}
        type="file"
        accept="image/jpeg,image/png,image/webp"
        onChange={(e) => {
          const file = e.currentTarget.files?.[0];
          if (file) upload(file);
        }}
        className="min-h-target"
      />
      {state.phase === "done" ? <input type="hidden" name={name} value={state.fileId} /> : null}
      <div aria-live="polite" className="text-sm">
        {state.phase === "uploading" ? (
          <div className="flex items-center gap-2">
            <progress max={100} value={state.percent} className="h-3 w-48" aria-label="Upload progress" />
            <span className="figures" data-testid="upload-progress">{state.percent}%</span>
          </div>
        ) : state.phase === "done" ? (
          <p className="font-bold text-ok" data-testid="upload-done">✓ Uploaded {state.name}</p>
        ) : state.phase === "failed" ? (
          <p className="font-bold text-fault" role="alert">✕ {state.message}</p>
        ) : null}
      </div>
    </div>
  );
}
