import { useState } from "react";
import { Link } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { Dialog } from "../../components/Dialog.tsx";
import { Button } from "../../components/Button.tsx";
import { Field, FormError, Select, TextArea, TextInput, useZodForm } from "../../components/Form.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { AttachmentList } from "../../components/InspectionAttachments.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { Spinner } from "../../components/Spinner.tsx";
import type { Inspection, InspectionEvent, InspectionStatus } from "../../lib/contracts.ts";
import { allowedMoves, OUTCOMES, outcomeLabel, PRIORITIES, rescheduleSchema, STATUS_LABEL, todayIso, TRANSITION_LABEL } from "../../lib/inspections.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { inspectionDetailQueryOptions, techniciansQueryOptions, useUpdateInspection, type InspectionPatch } from "./api/inspections.ts";

const EVENT_LABEL: Record<string, string> = { created: "planned it", status: "moved it", rescheduled: "rescheduled it", reassigned: "reassigned it", changed: "edited it", attachment: "attached a file" };

/**
 * One inspection for the planner: details, files, status moves with a note, edits, and the history. Opened from a
 * list row or the month view (`initial` shows at once), or from a link (`/plan?inspection=<id>`: loaded by id).
 */
export function InspectionDialog({ inspectionId, initial, onClose }: { inspectionId: number | null; initial?: Inspection | null; onClose: () => void }) {
  const detail = useQuery({ ...inspectionDetailQueryOptions(inspectionId ?? 0), enabled: inspectionId !== null });
  const current = detail.data ?? (initial && initial.id === inspectionId ? initial : null);
  return (
    <Dialog open={inspectionId !== null} onClose={onClose} title={current ? current.title : inspectionId !== null ? `Inspection #${inspectionId}` : ""} wide>
      {current ? (
        <InspectionDetail key={current.id} inspection={current} historyPending={detail.isPending} />
      ) : detail.isError ? (
        <ErrorNote error={detail.error} />
      ) : (
        <Spinner />
      )}
    </Dialog>
  );
}

function InspectionDetail({ inspection: current, historyPending }: { inspection: Inspection; historyPending: boolean }) {
  const update = useUpdateInspection(); // status moves (their error shows under the moves)
  const reschedule = useUpdateInspection(); // the edit form (its error shows in the form)
  const technicians = useQuery(techniciansQueryOptions());
  const [note, setNote] = useState("");
  const [outcome, setOutcome] = useState("");
  const id = current.id;
  const currentDue = current.dueDate.slice(0, 10);
  // The same rules as PATCH /inspections/:id (src/shared/schemas/inspections.ts): a moved due date may not be in the past.
  const schema = rescheduleSchema(currentDue);
  const edit = useZodForm(schema, { dueDate: currentDue, assigneeId: String(current.assigneeId ?? ""), priority: String(current.priority) });
  const changed = edit.values.dueDate !== currentDue || edit.values.assigneeId !== String(current.assigneeId ?? "") || edit.values.priority !== current.priority;
  // A past date is refused on the field as soon as it is picked, before anything is sent.
  const dueCheck = schema.shape.dueDate.safeParse(edit.values.dueDate);
  const dueError = edit.errors.dueDate ?? (dueCheck.success ? null : dueCheck.error.issues[0]?.message);
  const listed = technicians.data?.some((t) => t.id === current.assigneeId);

  const move = async (status: InspectionStatus) => {
    const done = status === "done";
    await update.mutateAsync({ id, status, note: done ? undefined : note.trim() || undefined, ...(done ? { outcome, completionNote: note.trim() } : {}) });
    setNote("");
  };
  // Only what changed is sent: an untouched overdue date stays as it is.
  const save = edit.submit(async (data) => {
    const patch: InspectionPatch = {};
    if (data.dueDate !== currentDue) patch.dueDate = data.dueDate;
    if (data.assigneeId !== (current.assigneeId ?? null)) patch.assigneeId = data.assigneeId;
    if (data.priority !== current.priority) patch.priority = data.priority;
    await reschedule.mutateAsync({ id, ...patch });
  });

  const result = outcomeLabel(current.outcome);
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
          {result && <p className="font-medium">{result}</p>}
          {current.completionNote && <p className="whitespace-pre-wrap text-ink-muted">{current.completionNote}</p>}
        </div>
      )}
      {current.attachments?.length ? (
        <div>
          <h3 className="mb-2 text-caption font-semibold uppercase tracking-wide text-ink-muted">Photos and files</h3>
          <AttachmentList attachments={current.attachments} />
        </div>
      ) : current.status === "done" && current.attachments ? (
        <p className="text-caption text-ink-muted">No photo or capture file was attached.</p>
      ) : null}

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
        <form onSubmit={save} noValidate aria-label="Reschedule or reassign" className="grid gap-3 rounded-md border border-line p-3 sm:grid-cols-3">
          <h3 className="font-semibold sm:col-span-3">Reschedule or reassign</h3>
          <Field label="Due date" error={dueError}>
            {(p) => (
              <TextInput
                {...p}
                type="date"
                className="num"
                // today in the planner's zone; the date it has now stays selectable even when overdue
                min={currentDue < todayIso() ? currentDue : todayIso()}
                value={edit.values.dueDate}
                onChange={(e) => edit.set("dueDate", e.target.value)}
              />
            )}
          </Field>
          <Field label="Technician" error={edit.errors.assigneeId} hint={edit.values.assigneeId === "" && current.assigneeId ? "Takes it off their list; nobody holds it until you give it to someone." : undefined}>
            {(p) => (
              <Select {...p} value={edit.values.assigneeId} onChange={(e) => edit.set("assigneeId", e.target.value)}>
                <option value="">Nobody</option>
                {current.assigneeId && technicians.data && !listed && <option value={current.assigneeId}>{current.assigneeName ?? `#${current.assigneeId}`}</option>}
                {technicians.data?.map((t) => (
                  <option key={t.id} value={t.id}>{t.name}</option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Priority" error={edit.errors.priority}>
            {(p) => (
              <Select {...p} value={edit.values.priority} onChange={(e) => edit.set("priority", e.target.value)}>
                {PRIORITIES.map((x) => (
                  <option key={x.value} value={x.value}>{x.label}</option>
                ))}
              </Select>
            )}
          </Field>
          <div className="sm:col-span-3">
            <FormError message={edit.formError} />
          </div>
          <div className="flex justify-end sm:col-span-3">
            <Button type="submit" size="sm" variant="primary" disabled={!changed || !!dueError || reschedule.isPending || edit.submitting}>Save changes</Button>
          </div>
        </form>
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
                  <EventChange event={h} />
                </p>
                {h.note && <p className="text-ink-muted">{h.note}</p>}
              </li>
            ))}
          </ol>
        ) : historyPending ? (
          <p className="text-ink-muted">Loading…</p>
        ) : (
          <p className="text-ink-muted">No changes recorded yet.</p>
        )}
      </div>
    </div>
  );
}

/** What a reschedule or reassignment changed: "12 Mar 2026 → 19 Mar 2026", "Dana Reyes → nobody". */
function EventChange({ event: h }: { event: InspectionEvent }) {
  const d = (h.details ?? {}) as { from?: unknown; to?: unknown; fromName?: string | null; toName?: string | null };
  if (h.kind === "rescheduled" && typeof d.from === "string" && typeof d.to === "string")
    return (
      <>
        : <span className="num">{formatDate(d.from)}</span> → <span className="num">{formatDate(d.to)}</span>
      </>
    );
  if (h.kind === "reassigned") {
    const who = (id: unknown, name: string | null | undefined) => (id === null || id === undefined ? "nobody" : (name ?? `#${String(id)}`));
    return <>: {who(d.from, d.fromName)} → {who(d.to, d.toName)}</>;
  }
  return null;
}
