import type { Inspection } from "../lib/contracts.ts";
import { formatBytes } from "../lib/format.ts";

export type InspectionAttachment = NonNullable<Inspection["attachments"]>[number];

const isPhoto = (a: InspectionAttachment) => a.contentType === "image/png" || a.contentType === "image/jpeg";
const withDownload = (url: string) => `${url}${url.includes("?") ? "&" : "?"}download=1`;
const KIND: Record<string, string> = { "text/csv": "CSV capture", "audio/wav": "WAV capture" };

/**
 * The files kept with an inspection (GET /inspections/:id/attachments/:attachmentId): a photo as a thumbnail that
 * opens it full size, a capture file as a download link; each with its name and size.
 */
export function AttachmentList({ attachments, compact = false, label = "Attachments" }: { attachments: InspectionAttachment[] | undefined; compact?: boolean; label?: string }) {
  if (!attachments?.length) return null;
  const thumb = compact ? "size-10" : "size-16";
  return (
    <ul aria-label={label} className={`flex flex-wrap ${compact ? "gap-2" : "gap-3"}`}>
      {attachments.map((a) => (
        <li key={a.id} className="flex min-w-0 max-w-full items-center gap-2 rounded-md border border-line bg-surface p-1.5 pr-2.5" data-testid="attachment">
          {isPhoto(a) ? (
            <a href={a.url} target="_blank" rel="noopener" className="shrink-0" aria-label={`Open photo ${a.fileName}`}>
              <img src={a.url} alt="" loading="lazy" className={`${thumb} rounded-sm border border-line bg-sunken object-cover`} />
            </a>
          ) : (
            <span aria-hidden="true" className={`${thumb} num inline-grid shrink-0 place-items-center rounded-sm border border-line bg-sunken text-caption text-ink-muted`}>
              {a.contentType === "audio/wav" ? "WAV" : "CSV"}
            </span>
          )}
          <span className="flex min-w-0 flex-col">
            <a href={isPhoto(a) ? a.url : withDownload(a.url)} {...(isPhoto(a) ? { target: "_blank", rel: "noopener" } : { download: a.fileName })} className="truncate font-medium [overflow-wrap:anywhere]">
              {a.fileName}
            </a>
            <span className="text-caption text-ink-muted">
              <span className="num">{formatBytes(a.size)}</span> · {isPhoto(a) ? "photo" : (KIND[a.contentType] ?? a.contentType)}
              {isPhoto(a) && (
                <>
                  {" · "}
                  <a href={withDownload(a.url)} download={a.fileName} aria-label={`Download ${a.fileName}`}>
                    download
                  </a>
                </>
              )}
            </span>
          </span>
        </li>
      ))}
    </ul>
  );
}
