"use client";

import { useRouter } from "next/navigation";
import { useCallback, useState } from "react";
import { useDropzone } from "react-dropzone";
import { useHydrated } from "@/features/shared/components/use-hydrated";
import { CircleCheck, CircleX, ImageUp, LoaderCircle, RotateCw, Trash2, X } from "lucide-react";

interface Item {
  key: string;
  name: string;
  /** Kept so a failed upload can be tried again without choosing the file anew. */
  file: File;
  stage: string;
  progress: number;
  state: "uploading" | "done" | "failed";
  message?: string;
}

// Each state has its own icon and words as well as its colour, so none relies on colour alone.
const itemTone: Record<Item["state"], string> = {
  uploading: "border-peat-300 bg-white text-ink",
  done: "border-peat-500 bg-peat-50 text-peat-900",
  failed: "border-alarm-500 bg-alarm-100 text-alarm-700",
};
const barTone: Record<Item["state"], string> = {
  uploading: "bg-peat-500",
  done: "bg-peat-500",
  failed: "bg-alarm-500",
};

function UploadItem({ item, onRetry, onDismiss }: { item: Item; onRetry: () => void; onDismiss: () => void }) {
  const Icon = item.state === "done" ? CircleCheck : item.state === "failed" ? CircleX : LoaderCircle;
  return (
    <li
      className={`grid gap-2 rounded-md border-l-4 border p-3 ${itemTone[item.state]}`}
      data-testid="upload-item"
      data-state={item.state}
    >
      <div className="flex flex-wrap items-start gap-2">
        <Icon
          className={`mt-0.5 h-5 w-5 shrink-0 ${item.state === "uploading" ? "motion-safe:animate-spin" : ""}`}
          aria-hidden="true"
        />
        <p className="min-w-0 flex-1 break-words">
          <strong className="break-all">{item.name}</strong>:{" "}
          {item.state === "uploading" ? (
            `uploading… ${Math.round(item.progress * 100)} %`
          ) : item.state === "done" ? (
            "added to the report."
          ) : (
            <>
              <strong>not added.</strong> {item.message}
            </>
          )}
        </p>
        {item.state === "failed" ? (
          <div className="flex gap-2">
            <button
              type="button"
              onClick={onRetry}
              className="inline-flex items-center gap-1 rounded-md border border-alarm-700 bg-white px-3 py-1 text-sm font-bold text-alarm-700 hover:bg-alarm-100"
            >
              <RotateCw className="h-4 w-4" aria-hidden="true" />
              Retry<span className="sr-only"> {item.name}</span>
            </button>
            <button
              type="button"
              onClick={onDismiss}
              className="inline-flex items-center gap-1 rounded-md px-2 py-1 text-sm text-alarm-700 underline"
            >
              <X className="h-4 w-4" aria-hidden="true" />
              Dismiss<span className="sr-only"> {item.name}</span>
            </button>
          </div>
        ) : null}
      </div>
      {item.state === "uploading" ? (
        <progress
          max={1}
          value={item.progress}
          className="h-2 w-full accent-peat-500"
          aria-label={`Upload of ${item.name}`}
        />
      ) : (
        <div className={`h-2 w-full rounded ${barTone[item.state]}`} aria-hidden="true" />
      )}
    </li>
  );
}

export interface ExistingPhoto {
  id: string;
  width: number;
  height: number;
  stage: string;
}

/** Uploads one file with progress events (fetch has no upload progress; XMLHttpRequest does). */
function send(
  reportId: string,
  file: File,
  stage: string,
  onProgress: (p: number) => void,
): Promise<{ ok: boolean; message?: string }> {
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
    xhr.onerror = () =>
      resolve({ ok: false, message: "The upload was interrupted; check your connection and try again." });
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
  const update = (key: string, patch: Partial<Item>) =>
    setItems((xs) => xs.map((x) => (x.key === key ? { ...x, ...patch } : x)));

  const upload = useCallback(
    async (batch: Item[]) => {
      // One at a time: the server re-encodes two at a time anyway, and progress stays readable.
      for (const item of batch) {
        const r = await send(reportId, item.file, item.stage, (p) => update(item.key, { progress: p }));
        update(
          item.key,
          r.ok ? { state: "done", progress: 1, message: undefined } : { state: "failed", message: r.message },
        );
      }
      router.refresh();
    },
    [reportId, router],
  );
  const onDrop = useCallback(
    (files: File[]) => {
      const batch: Item[] = files.map((f, i) => ({
        key: `${Date.now()}-${i}-${f.name}`,
        name: f.name,
        file: f,
        stage,
        progress: 0,
        state: "uploading",
      }));
      setItems((xs) => [...xs, ...batch]);
      void upload(batch);
    },
    [stage, upload],
  );
  const retry = (item: Item) => {
    const again: Item = { ...item, state: "uploading", progress: 0, message: undefined };
    update(item.key, again);
    void upload([again]);
  };
  const live = useHydrated();
  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({
    onDrop,
    noClick: true,
    multiple: true,
    disabled: !live,
  });

  return (
    <section className="grid gap-3" aria-label="Photos">
      <h3 className="text-lg font-bold text-peat-900">Photos (optional, up to 12)</h3>
      <p className="text-sm text-peat-700">
        JPEG, PNG, WebP or AVIF, up to 10 MB each. Location and camera data are removed before a photo is stored.
      </p>
      <div className="flex items-center gap-3">
        <label htmlFor="photo-stage" className="font-bold">
          These photos show
        </label>
        <select
          id="photo-stage"
          className="rounded-md border border-peat-300 bg-white px-3 py-2"
          value={stage}
          onChange={(e) => setStage(e.target.value)}
        >
          <option value="before">before treatment</option>
          <option value="during">during treatment</option>
          <option value="after">after treatment</option>
        </select>
      </div>
      <div
        {...getRootProps()}
        className={`grid justify-items-center gap-2 rounded-lg border-2 border-dashed p-6 text-center ${isDragActive ? "border-peat-700 bg-peat-50" : "border-peat-300 bg-white"}`}
      >
        <input {...getInputProps({ disabled: !live })} aria-label="Choose photos" data-testid="photo-input" />
        <ImageUp className="h-8 w-8 text-peat-700" aria-hidden="true" />
        <p>{isDragActive ? "Drop the photos here." : "Drag photos here, or"}</p>
        <button
          type="button"
          onClick={open}
          disabled={!live}
          className="inline-flex items-center gap-1.5 rounded-md border border-peat-500 bg-white px-4 py-2 font-bold disabled:opacity-60"
        >
          Choose photos…
        </button>
      </div>
      {items.length ? (
        <ul className="grid gap-2" aria-live="polite" data-testid="upload-list">
          {items.map((it) => (
            <UploadItem
              key={it.key}
              item={it}
              onRetry={() => retry(it)}
              onDismiss={() => setItems((xs) => xs.filter((x) => x.key !== it.key))}
            />
          ))}
        </ul>
      ) : null}
      {existing.length ? (
        <ul className="flex flex-wrap gap-3" data-testid="photo-list">
          {existing.map((p) => (
            <li key={p.id} className="grid gap-1 text-sm">
              <img
                src={`/api/photos/${p.id}?size=thumb`}
                alt={`Photo ${p.stage} treatment`}
                className="h-24 rounded border border-peat-100 object-cover"
              />
              <button
                type="button"
                disabled={removing === p.id}
                className="inline-flex items-center gap-1 text-alarm-700 underline"
                onClick={async () => {
                  setRemoving(p.id);
                  await fetch(`/api/photos/${p.id}`, { method: "DELETE" });
                  setRemoving(null);
                  router.refresh();
                }}
              >
                <Trash2 className="h-4 w-4" aria-hidden="true" />
                Remove
              </button>
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}
