import { Link } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { Dialog } from "../../components/Dialog.tsx";
import { Button, ButtonLink } from "../../components/Button.tsx";
import { Alert, ErrorNote } from "../../components/Alert.tsx";
import { Spinner } from "../../components/Spinner.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { AttachmentList } from "../../components/InspectionAttachments.tsx";
import { SafetyCaution } from "../../components/SafetyCaution.tsx";
import type { Inspection } from "../../lib/contracts.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { isOverdue, outcomeLabel } from "../../lib/inspections.ts";
import { myInspectionQueryOptions, useMoveInspection } from "./api/my-work.ts";

/**
 * One inspection for the technician, opened from a done row or from the link in a mail or calendar entry
 * (`/my-work?inspection=<id>`): what to do, where, by when, the result and its files; start and complete when it is
 * theirs and open. An inspection no longer theirs (reassigned, cancelled) says so instead of vanishing.
 */
export function InspectionDetailDialog({ inspectionId, userId, onClose, onComplete }: { inspectionId: number | null; userId: number | undefined; onClose: () => void; onComplete: (i: Inspection) => void }) {
  const q = useQuery({ ...myInspectionQueryOptions(inspectionId ?? 0), enabled: inspectionId !== null });
  return (
    <Dialog open={inspectionId !== null} onClose={onClose} title={q.data ? q.data.title : `Inspection #${inspectionId ?? ""}`} wide>
      {q.data ? <Detail inspection={q.data} userId={userId} onComplete={onComplete} /> : q.isError ? <ErrorNote error={q.error} /> : <Spinner />}
    </Dialog>
  );
}

function Detail({ inspection: i, userId, onComplete }: { inspection: Inspection; userId: number | undefined; onComplete: (i: Inspection) => void }) {
  const move = useMoveInspection();
  const mine = userId !== undefined && i.assigneeId === userId;
  const open = i.status === "planned" || i.status === "in_progress";
  const overdue = isOverdue(i);
  return (
    <div className="flex flex-col gap-4" data-testid="inspection-detail" data-inspection-id={i.id}>
      {i.status === "cancelled" ? (
        <Alert tone="info">This inspection was cancelled; there is nothing more to do for it.</Alert>
      ) : !mine && open ? (
        <Alert tone="info">{i.assigneeName ? `This inspection is now assigned to ${i.assigneeName}.` : "This inspection is no longer assigned to you; nobody holds it for now."}</Alert>
      ) : null}
      <dl className="grid grid-cols-2 gap-x-4 gap-y-2 sm:grid-cols-4">
        <div>
          <dt className="text-caption text-ink-muted">Status</dt>
          <dd><InspectionStatusPill status={i.status} /></dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Motor</dt>
          <dd>
            <Link to={`/motors/${i.assetId}`} className="num font-medium">{i.assetTag ?? `#${i.assetId}`}</Link> <span className="text-ink-muted">{i.assetName}</span>
            {i.siteName && <span className="block text-caption text-ink-faint">{i.siteName}</span>}
          </dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Due</dt>
          <dd className={`num ${overdue ? "font-semibold text-danger" : ""}`}>
            {formatDate(i.dueDate)}
            {overdue && <span className="ml-1 font-sans text-caption">overdue</span>}
          </dd>
        </div>
        <div>
          <dt className="text-caption text-ink-muted">Priority</dt>
          <dd><PriorityTag priority={String(i.priority)} /></dd>
        </div>
      </dl>
      {i.instructions && (
        <div>
          <h3 className="mb-1 text-caption font-semibold uppercase tracking-wide text-ink-muted">Instructions</h3>
          <p className="whitespace-pre-wrap">{i.instructions}</p>
        </div>
      )}
      {(i.outcome || i.completionNote) && (
        <div className="rounded-md border border-line bg-sunken/50 p-3">
          <h3 className="mb-1 text-caption font-semibold uppercase tracking-wide text-ink-muted">Result</h3>
          {i.outcome && <p className="font-medium">{outcomeLabel(i.outcome)}</p>}
          {i.completionNote && <p className="whitespace-pre-wrap text-ink-muted">{i.completionNote}</p>}
          {i.completedAt && <p className="mt-1 text-caption text-ink-faint">Done <span className="num">{formatDateTime(i.completedAt)}</span></p>}
        </div>
      )}
      {i.attachments?.length ? (
        <div>
          <h3 className="mb-2 text-caption font-semibold uppercase tracking-wide text-ink-muted">Photos and files</h3>
          <AttachmentList attachments={i.attachments} />
        </div>
      ) : null}
      {mine && open && (
        <>
          <SafetyCaution compact />
          <div className="flex flex-wrap items-center justify-end gap-2">
            {i.status === "planned" && (
              <Button size="sm" disabled={move.isPending} onClick={() => move.mutate({ id: i.id, status: "in_progress" })}>
                Start
              </Button>
            )}
            <ButtonLink size="sm" to={`/upload?assetId=${i.assetId}`}>Upload a capture</ButtonLink>
            <Button size="sm" variant="primary" onClick={() => onComplete(i)}>Complete…</Button>
          </div>
          <ErrorNote error={move.error} />
        </>
      )}
    </div>
  );
}
