"use client";

import { useRouter } from "next/navigation";
import { useCallback, useState } from "react";
import { useDropzone } from "react-dropzone";

interface Item {
  key: string;
  name: string;
  progress: number;
  state: "uploading" | "done" | "failed";
  message?: string;
}

export interface ExistingPhoto {
  id: string;
  width: number;
  height: number;
  stage: string;
}

/** Uploads one file with progress events (fetch has no upload progress; XMLHttpRequest does). */
function send(reportId: string, file: File, stage: string, onProgress: (p: number) => void): Promise<{ ok: boolean; message?: string }> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/reports/${reportId}/photos`);
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () => {
      if (xhr.status === 201) resolve({ ok: true });
      else {
        let message = `The server answered ${xhr.status}.`;
        try {
          message = JSON.parse(xhr.responseText).error.message;
        } catch {
          // Keep the status sentence.
        }
        resolve({ ok: false, message });
      }
    };
    xhr.onerror = () => resolve({ ok: false, message: "The upload was interrupted; check your connection and try again." });
    const form = new FormData();
    form.set("file", file);
    form.set("stage", stage);
    xhr.send(form);
  });
}

export function PhotoUploader({ reportId, existing }: { reportId: string; existing: ExistingPhoto[] }) {
  const router = useRouter();
  const [items, setItems] = useState<Item[]>([]);
  const [stage, setStage] = useState("during");
  const [removing, setRemoving] = useState<string | null>(null);
  const update = (key: string, patch: Partial<Item>) => setItems((xs) => xs.map((x) => (x.key === key ? { ...x, ...patch } : x)));

  const onDrop = useCallback(
    async (files: File[]) => {
      const batch = files.map((f, i) => ({ key: `${Date.now()}-${i}-${f.name}`, name: f.name, progress: 0, state: "uploading" as const }));
      setItems((xs) => [...xs, ...batch]);
      // One at a time: the server re-encodes two at a time anyway, and progress stays readable.
      for (const [i, file] of files.entries()) {
        const key = batch[i]!.key;
        const r = await send(reportId, file, stage, (p) => update(key, { progress: p }));
        update(key, r.ok ? { state: "done", progress: 1 } : { state: "failed", message: r.message });
      }
      router.refresh();
    },
    [reportId, stage, router],
  );
  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({ onDrop, noClick: true, multiple: true });

  return (
    <section className="grid gap-3" aria-label="Photos">
      <h3 className="text-lg font-bold text-peat-900">Photos (optional, up to 12)</h3>
      <p className="text-sm text-peat-700">JPEG, PNG, WebP or AVIF, up to 10 MB each. Location and camera data are removed before a photo is stored.</p>
      <div className="flex items-center gap-3">
        <label htmlFor="photo-stage" className="font-bold">These photos show</label>
        <select id="photo-stage" className="rounded-md border border-peat-300 bg-white px-3 py-2" value={stage} onChange={(e) => setStage(e.target.value)}>
          <option value="before">before treatment</option>
          <option value="during">during treatment</option>
          <option value="after">after treatment</option>
        </select>
      </div>
      <div {...getRootProps()} className={`rounded-lg border-2 border-dashed p-6 text-center ${isDragActive ? "border-peat-700 bg-peat-50" : "border-peat-300 bg-white"}`}>
        <input {...getInputProps()} aria-label="Choose photos" data-testid="photo-input" />
        <p>{isDragActive ? "Drop the photos here." : "Drag photos here, or"}</p>
        <button type="button" onClick={open} className="mt-2 rounded-md border border-peat-500 px-4 py-2 font-bold">Choose photos…</button>
      </div>
      {items.length ? (
        <ul className="grid gap-2" aria-live="polite">
          {items.map((it) => (
            <li key={it.key} className="grid gap-1">
              <span>{it.name}: {it.state === "uploading" ? `uploading ${Math.round(it.progress * 100)} %` : it.state === "done" ? "added" : `not added — ${it.message}`}</span>
              <progress max={1} value={it.progress} className="w-full" aria-label={`Upload of ${it.name}`} />
            </li>
          ))}
        </ul>
      ) : null}
      {existing.length ? (
        <ul className="flex flex-wrap gap-3" data-testid="photo-list">
          {existing.map((p) => (
            <li key={p.id} className="grid gap-1 text-sm">
              <img src={`/api/photos/${p.id}?size=thumb`} alt={`Photo ${p.stage} treatment`} className="h-24 rounded border border-peat-100 object-cover" />
              <button
                type="button"
                disabled={removing === p.id}
                className="text-alarm-700 underline"
                onClick={async () => {
                  setRemoving(p.id);
                  await fetch(`/api/photos/${p.id}`, { method: "DELETE" });
                  setRemoving(null);
                  router.refresh();
                }}
              >
                Remove
              </button>
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}
