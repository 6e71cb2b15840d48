import { useEffect, useRef, useState, type DragEvent } from "react";
import { useSearchParams } from "react-router-dom";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { Page, Section } from "../../components/Page.tsx";
import { Field, FormError, Select, TextArea, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { SafetyCaution } from "../../components/SafetyCaution.tsx";
import { formatBytes, toLocalInputValue } from "../../lib/format.ts";
import { rootKeys } from "../../lib/query.ts";
import { assetQueryOptions, siteAssetsQueryOptions } from "./api/targets.ts";
import { sitesQueryOptions } from "../../lib/sites.ts";
import { uploadCapture } from "./api/captures.ts";
import { ACCEPTED_EXTENSIONS, checkFile, rejectionMessage, SAFETY_ACK_KEY, uploadFormSchema } from "./upload-logic.ts";
import { CaptureStatusLine } from "./CaptureStatusLine.tsx";
import { SiteOptions } from "../../components/SiteOptions.tsx";

type Item = {
  key: string;
  file: File;
  state: "ready" | "rejected" | "uploading" | "sent" | "failed";
  progress: number;
  message?: string;
  captureIds?: number[];
};

let seq = 0;

export default function UploadPage() {
  const [sp] = useSearchParams();
  const qc = useQueryClient();
  const [acknowledged, setAcknowledged] = useState(() => sessionStorage.getItem(SAFETY_ACK_KEY) === "1");
  const [items, setItems] = useState<Item[]>([]);
  const [dragging, setDragging] = useState(false);
  const [busy, setBusy] = useState(false);
  const input = useRef<HTMLInputElement>(null);

  const form = useZodForm(uploadFormSchema, {
    siteId: sp.get("siteId") ?? "",
    assetId: sp.get("assetId") ?? "",
    measurementPointId: sp.get("pointId") ?? "",
    takenAt: toLocalInputValue(new Date()),
    notes: "",
    sampleRate: "",
  });
  const siteId = Number(form.values.siteId) || 0;
  const assetId = Number(form.values.assetId) || 0;
  const sites = useQuery(sitesQueryOptions());
  const assets = useQuery(siteAssetsQueryOptions(siteId));
  const asset = useQuery(assetQueryOptions(assetId));
  // A motor given in the address picks its site.
  const assetSite = asset.data?.siteId;
  useEffect(() => {
    if (!siteId && assetSite) form.set("siteId", String(assetSite));
  }, [siteId, assetSite]); // eslint-disable-line react-hooks/exhaustive-deps

  const acknowledge = () => {
    sessionStorage.setItem(SAFETY_ACK_KEY, "1");
    setAcknowledged(true);
  };

  const addFiles = (list: FileList | File[]) => {
    const next: Item[] = Array.from(list).map((file) => {
      const problem = checkFile(file);
      return { key: `f${++seq}`, file, state: problem ? "rejected" : "ready", progress: 0, message: problem ?? undefined };
    });
    setItems((cur) => [...cur.filter((i) => i.state !== "sent"), ...next]);
  };
  const patch = (key: string, changes: Partial<Item>) => setItems((cur) => cur.map((i) => (i.key === key ? { ...i, ...changes } : i)));
  const remove = (key: string) => setItems((cur) => cur.filter((i) => i.key !== key));

  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setDragging(false);
    if (e.dataTransfer.files.length) addFiles(e.dataTransfer.files);
  };

  const ready = items.filter((i) => i.state === "ready" || i.state === "failed");
  const hasCsv = items.some((i) => i.file.name.toLowerCase().endsWith(".csv"));

  const onSubmit = form.submit(async (v) => {
    if (!ready.length) return;
    setBusy(true);
    try {
      for (const item of ready) {
        patch(item.key, { state: "uploading", progress: 0, message: undefined });
        try {
          const answer = await uploadCapture(
            item.file,
            { assetId: v.assetId, measurementPointId: v.measurementPointId, takenAt: v.takenAt, notes: v.notes, sampleRate: v.sampleRate },
            (f) => patch(item.key, { progress: f }),
          );
          patch(item.key, { state: "sent", progress: 1, captureIds: answer.captures.map((c) => c.id) });
        } catch (err) {
          patch(item.key, { state: "failed", message: rejectionMessage(err) });
        }
      }
      await qc.invalidateQueries({ queryKey: rootKeys.captures });
    } finally {
      setBusy(false);
    }
  });

  const points = asset.data?.measurementPoints ?? [];

  return (
    <Page title="Upload" description="Send stator-current or vibration captures of one motor for analysis. CSV and WAV files; several at once.">
      {!acknowledged ? (
        <div className="mb-5 max-w-3xl">
          <SafetyCaution>
            <Button variant="primary" size="sm" className="mt-3" onClick={acknowledge}>
              I understand: continue
            </Button>
          </SafetyCaution>
        </div>
      ) : (
        <div className="mb-5 max-w-3xl">
          <SafetyCaution compact />
        </div>
      )}

      <form onSubmit={onSubmit} noValidate className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_22rem]" aria-disabled={!acknowledged}>
        <div className="flex min-w-0 flex-col gap-4">
          <div
            onDragOver={(e) => {
              e.preventDefault();
              setDragging(true);
            }}
            onDragLeave={() => setDragging(false)}
            onDrop={onDrop}
            data-testid="drop-zone"
            className={`flex flex-col items-center justify-center gap-2 rounded-lg border-2 border-dashed px-6 py-10 text-center transition-colors ${
              dragging ? "border-brand bg-brand-soft" : "border-line-strong bg-surface"
            } ${acknowledged ? "" : "pointer-events-none opacity-50"}`}
          >
            <svg aria-hidden="true" viewBox="0 0 24 24" className="size-8 text-brand" fill="none" stroke="currentColor" strokeWidth="1.6">
              <path d="M12 15V4m0 0-4 4m4-4 4 4M5 15v3.5A1.5 1.5 0 0 0 6.5 20h11a1.5 1.5 0 0 0 1.5-1.5V15" strokeLinecap="round" strokeLinejoin="round" />
            </svg>
            <p className="font-medium">Drop capture files here</p>
            <p className="text-caption text-ink-muted">
              <span className="num">{ACCEPTED_EXTENSIONS.join(" ")}</span> · one capture per file
            </p>
            <Button size="sm" disabled={!acknowledged} onClick={() => input.current?.click()}>
              Choose files…
            </Button>
            <input
              ref={input}
              type="file"
              multiple
              accept=".csv,.wav,text/csv,audio/wav"
              className="sr-only"
              aria-label="Capture files"
              data-testid="file-input"
              onChange={(e) => {
                if (e.target.files) addFiles(e.target.files);
                e.target.value = "";
              }}
            />
          </div>

          {items.length > 0 && (
            <Section title="Files">
              <ul className="flex flex-col divide-y divide-line" aria-label="Files to upload">
                {items.map((item) => (
                  <FileRow key={item.key} item={item} onRemove={() => remove(item.key)} />
                ))}
              </ul>
            </Section>
          )}
        </div>

        <Section title="Where and when" className="h-fit">
          <fieldset disabled={!acknowledged || busy} className="flex flex-col gap-3">
            <Field label="Site" error={form.errors.siteId}>
              {(p) => (
                <Select
                  {...p}
                  value={form.values.siteId}
                  onChange={(e) => {
                    form.set("siteId", e.target.value);
                    form.set("assetId", "");
                    form.set("measurementPointId", "");
                  }}
                >
                  <option value="">{sites.isPending ? "Loading sites…" : "Pick a site"}</option>
                  <SiteOptions sites={sites.data} />
                </Select>
              )}
            </Field>
            <Field label="Motor" error={form.errors.assetId}>
              {(p) => (
                <Select
                  {...p}
                  value={form.values.assetId}
                  disabled={!siteId}
                  onChange={(e) => {
                    form.set("assetId", e.target.value);
                    form.set("measurementPointId", "");
                  }}
                >
                  <option value="">{!siteId ? "Pick a site first" : assets.isPending ? "Loading motors…" : "Pick a motor"}</option>
                  {assets.data?.map((a) => (
                    <option key={a.id} value={a.id}>
                      {a.tag} · {a.name}
                      {a.areaName ? ` (${a.areaName})` : ""}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="Measurement point" optional error={form.errors.measurementPointId} hint={assetId && !points.length && !asset.isPending ? "This motor has no measurement points registered." : undefined}>
              {(p) => (
                <Select {...p} value={form.values.measurementPointId} disabled={!assetId || !points.length} onChange={(e) => form.set("measurementPointId", e.target.value)}>
                  <option value="">From the file's channels</option>
                  {points.map((pt) => (
                    <option key={pt.id} value={pt.id}>
                      {pt.name} ({pt.kind}
                      {pt.position ? `, ${pt.position}` : ""})
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="Capture time" error={form.errors.takenAt} hint="When the recording was made (your local time).">
              {(p) => <TextInput {...p} type="datetime-local" className="num" value={form.values.takenAt} onChange={(e) => form.set("takenAt", e.target.value)} />}
            </Field>
            {hasCsv && (
              <Field label="Sample rate (Hz)" optional error={form.errors.sampleRate} hint="Only for CSV files without a time column.">
                {(p) => <TextInput {...p} inputMode="decimal" className="num" placeholder="e.g. 10000" value={form.values.sampleRate} onChange={(e) => form.set("sampleRate", e.target.value)} />}
              </Field>
            )}
            <Field label="Notes" optional error={form.errors.notes}>
              {(p) => <TextArea {...p} rows={3} placeholder="Load at the time, anything unusual…" value={form.values.notes} onChange={(e) => form.set("notes", e.target.value)} />}
            </Field>
            <FormError message={form.formError} />
            <Button type="submit" variant="primary" disabled={!acknowledged || busy || ready.length === 0}>
              {busy ? "Uploading…" : ready.length > 1 ? `Upload ${ready.length} files` : "Upload"}
            </Button>
          </fieldset>
        </Section>
      </form>
    </Page>
  );
}

function FileRow({ item, onRemove }: { item: Item; onRemove: () => void }) {
  const pct = Math.round(item.progress * 100);
  return (
    <li className="flex flex-col gap-1.5 py-2.5" data-testid="upload-row" data-state={item.state}>
      <div className="flex items-center gap-3">
        <span className="num min-w-0 flex-1 truncate font-medium" title={item.file.name}>
          {item.file.name}
        </span>
        <span className="num shrink-0 text-caption text-ink-muted">{formatBytes(item.file.size)}</span>
        {(item.state === "ready" || item.state === "rejected" || item.state === "failed") && (
          <button type="button" onClick={onRemove} className="shrink-0 text-caption text-ink-muted underline hover:text-ink" aria-label={`Remove ${item.file.name}`}>
            Remove
          </button>
        )}
      </div>
      {item.state === "uploading" && (
        <div className="flex items-center gap-2">
          <div className="h-1.5 flex-1 overflow-hidden rounded-full bg-sunken" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100} aria-label={`Uploading ${item.file.name}`}>
            <div className="h-full rounded-full bg-brand transition-[width]" style={{ width: `${pct}%` }} />
          </div>
          <span className="num w-10 text-right text-caption text-ink-muted">{pct} %</span>
        </div>
      )}
      {item.state === "ready" && <p className="text-caption text-ink-muted">Ready to upload</p>}
      {(item.state === "rejected" || item.state === "failed") && (
        <p className="text-caption text-danger" role="alert">
          {item.state === "rejected" ? "Not sent: " : "Rejected: "}
          {item.message}
        </p>
      )}
      {item.state === "sent" && item.captureIds?.map((id) => <CaptureStatusLine key={id} id={id} />)}
    </li>
  );
}
