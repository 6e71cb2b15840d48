import { useState } from "react";
import { Link } from "react-router-dom";
import { Dialog } from "../../components/Dialog.tsx";
import { Field, FormError, Select, TextArea, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { Alert } from "../../components/Alert.tsx";
import type { Inspection } from "../../lib/contracts.ts";
import { completeSchema, OUTCOMES } from "../../lib/inspections.ts";
import { formatBytes } from "../../lib/format.ts";
import { errorMessage } from "../../lib/api.ts";
import { uploadAttachment, useMoveInspection } from "./api/my-work.ts";

export function CompleteDialog({ inspection, onClose }: { inspection: Inspection | null; onClose: () => void }) {
  return (
    <Dialog open={!!inspection} onClose={onClose} title="Complete the inspection">
      {inspection && <CompleteForm key={inspection.id} inspection={inspection} onDone={onClose} />}
    </Dialog>
  );
}

function CompleteForm({ inspection, onDone }: { inspection: Inspection; onDone: () => void }) {
  const form = useZodForm(completeSchema, { outcome: "", completionNote: "" });
  const move = useMoveInspection();
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [attachError, setAttachError] = useState<string | null>(null);

  const onSubmit = form.submit(async (data) => {
    setAttachError(null);
    if (file) {
      setProgress(0);
      try {
        await uploadAttachment(inspection.id, file, setProgress);
      } catch (err) {
        setProgress(null);
        setAttachError(`The attachment was not accepted: ${errorMessage(err)}`);
        return;
      }
    }
    if (inspection.status === "planned") await move.mutateAsync({ id: inspection.id, status: "in_progress" });
    await move.mutateAsync({ id: inspection.id, status: "done", outcome: data.outcome, completionNote: data.completionNote });
    onDone();
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <p>
        <span className="num font-semibold">{inspection.assetTag ?? `#${inspection.assetId}`}</span> · {inspection.title}
      </p>
      <Field label="Outcome" error={form.errors.outcome}>
        {(p) => (
          <Select {...p} value={form.values.outcome} onChange={(e) => form.set("outcome", e.target.value)}>
            <option value="">Pick an outcome</option>
            {OUTCOMES.map((o) => (
              <option key={o.value} value={o.value}>{o.label}</option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="What you found" error={form.errors.completionNote} >
        {(p) => <TextArea {...p} rows={4} value={form.values.completionNote} onChange={(e) => form.set("completionNote", e.target.value)} placeholder="Condition, readings taken, anything for the analyst" />}
      </Field>
      <Field label="Photo or capture file" optional hint="A photo (JPEG, PNG) or a capture (CSV, WAV) kept with the inspection.">
        {(p) => <input {...p} type="file" accept="image/*,.csv,.wav" className="text-body file:mr-3 file:rounded-md file:border file:border-line-strong file:bg-surface file:px-3 file:py-1 file:font-medium" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />}
      </Field>
      {file && progress !== null && (
        <div className="flex items-center gap-2 text-caption">
          <div className="h-1.5 flex-1 rounded-full bg-sunken" role="progressbar" aria-valuenow={Math.round(progress * 100)} aria-valuemin={0} aria-valuemax={100}>
            <div className="h-full rounded-full bg-brand" style={{ width: `${progress * 100}%` }} />
          </div>
          <span className="num">{formatBytes(file.size)}</span>
        </div>
      )}
      {attachError && <Alert tone="error">{attachError}</Alert>}
      <p className="text-caption text-ink-muted">
        To have a capture analysed, send it through <Link to={`/upload?assetId=${inspection.assetId}`}>Upload</Link> as well.
      </p>
      <FormError message={form.formError} />
      <div className="flex justify-end gap-2">
        <Button onClick={onDone}>Cancel</Button>
        <Button type="submit" variant="primary" disabled={form.submitting}>{form.submitting ? "Saving…" : "Mark done"}</Button>
      </div>
    </form>
  );
}
