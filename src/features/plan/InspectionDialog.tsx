import { useState } from "react";
import { Link } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { Dialog } from "../../components/Dialog.tsx";
import { Button } from "../../components/Button.tsx";
import { Field, Select, TextArea, TextInput } from "../../components/Form.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import type { Inspection, InspectionStatus } from "../../lib/contracts.ts";
import { allowedMoves, OUTCOMES, PRIORITIES, STATUS_LABEL, TRANSITION_LABEL } from "../../lib/inspections.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { inspectionDetailQueryOptions, techniciansQueryOptions, useUpdateInspection } from "./api/inspections.ts";

const EVENT_LABEL: Record<string, string> = { created: "planned it", status: "moved it", rescheduled: "rescheduled it", reassigned: "reassigned it", changed: "edited it", attachment: "attached a file" };

/** One inspection for the planner: details, status moves with a note, edits, and the history. */
export function InspectionDialog({ inspection, onClose }: { inspection: Inspection | null; onClose: () => void }) {
  return (
    <Dialog open={!!inspection} onClose={onClose} title={inspection ? inspection.title : ""} wide>
      {inspection && <InspectionDetail key={inspection.id} inspection={inspection} />}
    </Dialog>
  );
}

function InspectionDetail({ inspection: i }: { inspection: Inspection }) {
  const update = useUpdateInspection();
  const technicians = useQuery(techniciansQueryOptions());
  const detail = useQuery(inspectionDetailQueryOptions(i.id));
  const [note, setNote] = useState("");
  const [outcome, setOutcome] = useState("");
  const [edit, setEdit] = useState({ dueDate: i.dueDate.slice(0, 10), assigneeId: String(i.assigneeId ?? ""), priority: String(i.priority) });
  // The detail (with its history) once loaded; every change invalidates and refetches it.
  const current = detail.data ?? i;
  const changed = edit.dueDate !== current.dueDate.slice(0, 10) || edit.assigneeId !== String(current.assigneeId ?? "") || edit.priority !== current.priority;

  const move = async (status: InspectionStatus) => {
    const done = status === "done";
    await update.mutateAsync({ id: i.id, status, note: done ? undefined : note.trim() || undefined, ...(done ? { outcome, completionNote: note.trim() } : {}) });
    setNote("");
  };
  const save = async () => {
    await update.mutateAsync({ id: i.id, dueDate: edit.dueDate, assigneeId: Number(edit.assigneeId) || undefined, priority: edit.priority });
  };

  const outcomeLabel = OUTCOMES.find((o) => o.value === current.outcome)?.label ?? current.outcome;
  const moves = allowedMoves(current.status, "planner");
  return (
    <div className="flex flex-col gap-5">
      <dl className="grid grid-cols-2 gap-x-4 gap-y-2 sm:grid-cols-4">
        <div>
          <dt className="text-caption text-ink-muted">Status</dt>
          <dd><InspectionStatusPill status={current.status} /></dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Motor</dt>
          <dd>
            <Link to={`/motors/${current.assetId}`} className="num">{current.assetTag ?? `#${current.assetId}`}</Link>{" "}
            <span className="text-ink-muted">{current.assetName}</span>
          </dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Due</dt>
          <dd className="num">{formatDate(current.dueDate)}</dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Priority</dt>
          <dd><PriorityTag priority={String(current.priority)} /></dd>
        </div>
      </dl>
      {current.instructions && (
        <div>
          <h3 className="mb-1 text-caption font-semibold uppercase tracking-wide text-ink-muted">Instructions</h3>
          <p className="whitespace-pre-wrap">{current.instructions}</p>
        </div>
      )}
      {(current.outcome || current.completionNote) && (
        <div className="rounded-md border border-line bg-sunken/50 p-3">
          <h3 className="mb-1 text-caption font-semibold uppercase tracking-wide text-ink-muted">Result</h3>
          {outcomeLabel && <p className="font-medium">{outcomeLabel}</p>}
          {current.completionNote && <p className="whitespace-pre-wrap text-ink-muted">{current.completionNote}</p>}
        </div>
      )}

      {moves.length > 0 && (
      <div className="rounded-md border border-line p-3">
        <h3 className="mb-2 font-semibold">Move to</h3>
        <div className="flex flex-col gap-2">
          {moves.includes("done") && (
            <Field label="Outcome (to mark it done)">
              {(p) => (
                <Select {...p} value={outcome} onChange={(e) => setOutcome(e.target.value)}>
                  <option value="">Pick an outcome</option>
                  {OUTCOMES.map((o) => (
                    <option key={o.value} value={o.value}>{o.label}</option>
                  ))}
                </Select>
              )}
            </Field>
          )}
          <Field label={moves.includes("done") ? "Note (for done: what was found and done)" : "Note for the history"} optional={!moves.includes("done")}>
            {(p) => <TextArea {...p} rows={2} value={note} onChange={(e) => setNote(e.target.value)} placeholder="Why, or what was agreed" />}
          </Field>
          <div className="flex flex-wrap gap-2">
            {moves.map((s) => (
              <Button key={s} variant={s === "cancelled" ? "danger" : "primary"} size="sm" disabled={update.isPending || (s === "done" && (!outcome || !note.trim()))} onClick={() => move(s)}>
                {TRANSITION_LABEL[`${current.status}>${s}`] ?? STATUS_LABEL[s]}
              </Button>
            ))}
          </div>
        </div>
      </div>
      )}

      {(current.status === "planned" || current.status === "in_progress") && (
        <div className="grid gap-3 rounded-md border border-line p-3 sm:grid-cols-3">
          <h3 className="font-semibold sm:col-span-3">Reschedule or reassign</h3>
          <Field label="Due date">
            {(p) => <TextInput {...p} type="date" className="num" value={edit.dueDate} onChange={(e) => setEdit({ ...edit, dueDate: e.target.value })} />}
          </Field>
          <Field label="Technician">
            {(p) => (
              <Select {...p} value={edit.assigneeId} onChange={(e) => setEdit({ ...edit, assigneeId: e.target.value })}>
                <option value="">Nobody</option>
                {technicians.data?.map((t) => (
                  <option key={t.id} value={t.id}>{t.name}</option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Priority">
            {(p) => (
              <Select {...p} value={edit.priority} onChange={(e) => setEdit({ ...edit, priority: e.target.value })}>
                {PRIORITIES.map((x) => (
                  <option key={x.value} value={x.value}>{x.label}</option>
                ))}
              </Select>
            )}
          </Field>
          <div className="flex justify-end sm:col-span-3">
            <Button size="sm" variant="primary" disabled={!changed || update.isPending} onClick={save}>Save changes</Button>
          </div>
        </div>
      )}
      <ErrorNote error={update.error} />

      <div>
        <h3 className="mb-2 font-semibold">History</h3>
        {current.events?.length ? (
          <ol className="flex flex-col gap-2 border-l-2 border-line pl-4" aria-label="History">
            {current.events.map((h) => (
              <li key={h.id} className="relative">
                <span aria-hidden="true" className="absolute -left-[1.3rem] top-1.5 size-2 rounded-full bg-line-strong" />
                <p>
                  <span className="num text-caption text-ink-muted">{formatDateTime(h.at)}</span>{" "}
                  <span className="font-medium">{h.byName ?? ""}</span> <span className="text-ink-muted">{EVENT_LABEL[h.kind] ?? h.kind}</span>
                  {h.kind === "status" && h.to ? <> → {STATUS_LABEL[h.to as InspectionStatus] ?? h.to}</> : null}
                </p>
                {h.note && <p className="text-ink-muted">{h.note}</p>}
              </li>
            ))}
          </ol>
        ) : detail.isPending ? (
          <p className="text-ink-muted">Loading…</p>
        ) : (
          <p className="text-ink-muted">No changes recorded yet.</p>
        )}
      </div>
    </div>
  );
}
