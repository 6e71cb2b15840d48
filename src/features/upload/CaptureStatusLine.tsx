import { Link } from "react-router-dom";
import { useEffect, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { lastCaptureStatus, onServerEvent } from "../../lib/socket.ts";
import { captureQueryOptions } from "./api/captures.ts";
import { STATUS_STEPS, furthestStatus, stepIndex } from "./upload-logic.ts";
import { GradeBadge } from "../../components/GradeBadge.tsx";

/** Live state of one uploaded capture: steps received → queued → analysing → analysed, or failed with its reason. */
export function CaptureStatusLine({ id, initialStatus = "received" }: { id: number; initialStatus?: string }) {
  const q = useQuery(captureQueryOptions(id));
  // Show each step the moment its event arrives (also one that came before this row knew its id); the refetch
  // the same event starts brings the rest (grade, error). A fetch that read the row just before the worker moved
  // it on never steps the line back: a new upload only moves forward.
  const [live, setLive] = useState(() => lastCaptureStatus(id)?.status);
  useEffect(() => {
    setLive(lastCaptureStatus(id)?.status);
    return onServerEvent("capture:status", (e) => {
      if (e.id === id) setLive(e.status);
    });
  }, [id]);
  const status = furthestStatus(initialStatus, q.data?.status, live);
  const failed = status === "failed";
  const at = stepIndex(status);
  // The engine's rotor result (src/engine/types.ts BrokenBarResult): grade "R1".."R5" or null when not assessable.
  const rotor = q.data?.analysis?.brokenBar;
  const problems = (q.data?.analysis?.quality ?? []).filter((v) => v.severity !== "info").length;
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
      {/* the reason in words, not only in the badge's tooltip (touch screens have no hover) */}
      {status === "analysed" && rotor && !rotor.assessable && rotor.reason && <span className="text-ink-muted">{sentenceCase(rotor.reason)}.</span>}
      {status === "analysed" && problems > 0 && (
        <span className="text-ink-muted">
          {problems} data-quality {problems === 1 ? "note" : "notes"}: see the capture
        </span>
      )}
      <Link to={`/captures/${id}`} className="ml-auto">
        Open capture <span className="num">#{id}</span>
      </Link>
    </div>
  );
}

const sentenceCase = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
