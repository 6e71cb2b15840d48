import { Link } from "react-router-dom";
import { useEffect } from "react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { onServerEvent } from "../../lib/socket.ts";
import type { CaptureDetail } from "../../lib/contracts.ts";
import { captureQueryOptions } from "./api/captures.ts";
import { STATUS_STEPS, stepIndex } from "./upload-logic.ts";
import { GradeBadge } from "../../components/GradeBadge.tsx";

/** Live state of one uploaded capture: steps received → queued → analysing → analysed, or failed with its reason. */
export function CaptureStatusLine({ id, initialStatus = "received" }: { id: number; initialStatus?: string }) {
  const q = useQuery(captureQueryOptions(id));
  const queryClient = useQueryClient();
  // Show each step the moment its event arrives; the refetch the same event starts brings the rest (grade, error).
  useEffect(
    () =>
      onServerEvent("capture:status", (e) => {
        if (e.id !== id) return;
        queryClient.setQueryData<CaptureDetail>(captureQueryOptions(id).queryKey, (old) =>
          old ? { ...old, status: e.status, error: e.error ?? old.error } : old,
        );
      }),
    [id, queryClient],
  );
  const status = q.data?.status ?? initialStatus;
  const failed = status === "failed";
  const at = stepIndex(status);
  // The engine's rotor result (src/engine/types.ts BrokenBarResult): grade "R1".."R5" or null when not assessable.
  const rotor = q.data?.analysis?.brokenBar;
  return (
    <div className="flex flex-wrap items-center gap-x-3 gap-y-1 text-caption" data-testid="capture-status" data-status={status}>
      <ol className="flex items-center gap-1" aria-label={`Capture ${id}: ${status}`}>
        {STATUS_STEPS.map((s, i) => {
          const reached = i <= at;
          const isFail = failed && i === at;
          return (
            <li key={s.status} className="flex items-center gap-1">
              <span
                aria-hidden="true"
                className={`size-2 rounded-full ${isFail ? "bg-danger" : reached ? (i === at && status !== "analysed" ? "animate-pulse bg-brand" : "bg-brand") : "bg-line-strong"}`}
              />
              <span className={isFail ? "font-semibold text-danger" : i === at ? "font-semibold text-ink" : reached ? "text-ink-muted" : "text-ink-faint"}>
                {isFail ? "Failed" : s.label}
              </span>
              {i < STATUS_STEPS.length - 1 && <span aria-hidden="true" className="mx-0.5 text-ink-faint">›</span>}
            </li>
          );
        })}
      </ol>
      {failed && q.data?.error && <span className="text-danger">{q.data.error}</span>}
      {status === "analysed" && rotor && (
        <GradeBadge compact grade={rotor.grade ?? rotor.gradeName} assessable={rotor.assessable} reason={rotor.reason} />
      )}
      <Link to={`/captures/${id}`} className="ml-auto">
        Open capture <span className="num">#{id}</span>
      </Link>
    </div>
  );
}
