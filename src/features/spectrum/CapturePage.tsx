// Spectrum review of one capture (/captures/:id): the current spectrum around the supply and over the full range,
// the time waveform, the vibration spectrum, data-quality verdicts and readings beside the plot, and the analyst's
// verdict on the capture's finding.
import { Link, useParams } from "react-router-dom";
import { ErrorNote } from "../../components/Alert.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { Page, Section } from "../../components/Page.tsx";
import { PageLoading } from "../../components/Spinner.tsx";
import { formatDateTime } from "../../lib/format.ts";
import { useSession } from "../../lib/session.ts";
import { useCapture } from "./api/get-capture.ts";
import { useAssetFindings } from "./api/get-findings.ts";
import { useMotorCaptures } from "./api/get-motor-captures.ts";
import { QualityList, Readings, SlipEstimates } from "./components/Readings.tsx";
import { SpectrumViewer } from "./components/SpectrumViewer.tsx";
import { BearingLines } from "./components/BearingLines.tsx";
import { AnalysisVersions } from "./components/AnalysisVersions.tsx";
import { FindingLevel, VerdictForm, VerdictHistory } from "./components/VerdictForm.tsx";
import { WaveformPlot } from "./components/WaveformPlot.tsx";

/** Marker families of the vibration spectrum; the others belong to the current spectrum. */
const VIBRATION_FAMILIES = new Set(["vibration", "bearing"]);

const STATUS_WORD: Record<string, string> = {
  received: "Received, waiting to be queued",
  queued: "Queued for analysis",
  analysing: "Being analysed",
  analysed: "Analysed",
  failed: "Analysis failed",
};

export default function CapturePage() {
  const id = Number(useParams().id);
  const { can } = useSession();
  const capture = useCapture(id);
  const c = capture.data;
  const captures = useMotorCaptures(c?.assetId);
  const findings = useAssetFindings(c?.assetId);

  if (capture.isPending) return <PageLoading />;
  if (capture.isError || !c)
    return (
      <Page title={`Capture #${Number.isFinite(id) ? id : "?"}`}>
        <ErrorNote error={capture.error} />
      </Page>
    );

  const a = c.analysis;
  const currentChannels = c.channels.filter((ch) => ch.kind === "current");
  const vibrationChannels = c.channels.filter((ch) => ch.kind === "vibration");
  const earlier = (captures.data?.items ?? []).filter((x) => x.id !== c.id && x.status === "analysed");
  const own = (findings.data?.items ?? []).filter((f) => f.captureId === c.id);
  const otherOpen = (findings.data?.items ?? []).filter((f) => f.captureId !== c.id && f.status === "open");
  const analyst = can("verdicts.write");

  return (
    <Page
      wide
      title={`Capture #${c.id}`}
      eyebrow={
        <>
          {can("review.read") && <><Link to="/review">Review</Link> · </>}
          <Link to={`/motors/${c.assetId}`}><span className="num">{c.assetTag}</span> {c.assetName}</Link>
        </>
      }
      description={
        <>
          Taken {formatDateTime(c.takenAt ?? c.createdAt)}
          {c.takenBy && <> by {c.takenBy.name}</>} · {c.fileName ?? c.source} · <span className="num">{c.sampleRate ?? "—"} Hz</span> sample rate ·{" "}
          <span className="num">{c.durationS?.toFixed(1) ?? "—"} s</span> · {STATUS_WORD[c.status] ?? c.status}
          {a && <> · engine <span className="num">{a.engineVersion}</span>, analysis v{a.version}</>}
        </>
      }
    >
      {c.status === "failed" && <ErrorNote error={new Error(c.error ?? "The analysis failed.")} />}
      {!a ? (
        <EmptyState title={STATUS_WORD[c.status] ?? "No analysis yet"}>The spectrum appears here once the capture is analysed; this page updates by itself.</EmptyState>
      ) : (
        <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_22rem] xl:grid-cols-[minmax(0,1fr)_26rem]">
          <div className="flex min-w-0 flex-col gap-4">
            {currentChannels.length > 0 && c.sampleRate && (
              <Section title="Current spectrum">
                <SpectrumViewer
                  captureId={c.id}
                  kind="current"
                  channels={currentChannels}
                  sampleRate={c.sampleRate}
                  supplyHz={a.supplyHz}
                  slip={a.slip}
                  rpm={a.rpm}
                  markers={a.markers.filter((m) => !VIBRATION_FAMILIES.has(m.family))}
                  earlier={earlier}
                  thisTakenAt={c.takenAt}
                  title="Current spectrum"
                  autoFocus
                />
              </Section>
            )}
            {vibrationChannels.length > 0 && c.sampleRate && (
              <Section title="Vibration spectrum">
                <SpectrumViewer
                  captureId={c.id}
                  kind="vibration"
                  channels={vibrationChannels}
                  sampleRate={c.sampleRate}
                  supplyHz={a.supplyHz}
                  slip={a.slip}
                  rpm={a.rpm}
                  markers={a.markers.filter((m) => VIBRATION_FAMILIES.has(m.family))}
                  earlier={earlier}
                  thisTakenAt={c.takenAt}
                  title="Vibration spectrum"
                />
              </Section>
            )}
            <Section title="Time waveform">
              <WaveformPlot captureId={c.id} channels={c.channels} durationS={c.durationS} supplyHz={a.supplyHz} rpm={a.rpm} />
            </Section>
            {(c.analyses?.length ?? 0) > 1 && (
              <Section title="Analysis versions">
                <AnalysisVersions captureId={c.id} />
              </Section>
            )}
          </div>
          <aside className="flex flex-col gap-4">
            <Section title="Data quality">
              <QualityList a={a} />
            </Section>
            <Section title="Readings">
              <Readings a={a} />
            </Section>
            <Section title="Slip estimates">
              <SlipEstimates a={a} />
            </Section>
            {a.bearings && (
              <Section title="Bearing defect lines">
                <BearingLines b={a.bearings} />
              </Section>
            )}
            <Section title="Finding">
              {findings.isPending ? (
                <p className="text-ink-muted">Loading…</p>
              ) : findings.isError ? (
                <ErrorNote error={findings.error} />
              ) : own.length === 0 ? (
                <p className="text-ink-muted">
                  This capture raised no finding.
                  {otherOpen.length > 0 && (
                    <>
                      {" "}The motor has {otherOpen.length} open finding{otherOpen.length > 1 ? "s" : ""} from other captures:{" "}
                      {otherOpen.map((f) => (
                        <Link key={f.id} to={f.captureId ? `/captures/${f.captureId}` : `/motors/${f.assetId}`} className="mr-2 inline-flex items-center gap-1">
                          <FindingLevel f={f} /> #{f.captureId}
                        </Link>
                      ))}
                    </>
                  )}
                </p>
              ) : (
                <div className="flex flex-col gap-4">
                  {own.map((f) =>
                    analyst ? (
                      <VerdictForm key={f.id} finding={f} />
                    ) : (
                      <div key={f.id}>
                        <div className="mb-1 flex items-center gap-2">
                          <FindingLevel f={f} />
                          <span className="text-caption text-ink-muted">{f.status}</span>
                        </div>
                        <p>{f.summary}</p>
                        <VerdictHistory f={f} />
                      </div>
                    ),
                  )}
                </div>
              )}
            </Section>
          </aside>
        </div>
      )}
    </Page>
  );
}
