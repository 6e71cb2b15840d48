// The capture's headline readings beside the plot: supply, slip, speed, load (with its method), the sidebands,
// the rotor grade and why, the broken-bar estimate and every slip estimate with its confidence.
import type { ReactNode } from "react";
import { Figure } from "../../../components/Figure.tsx";
import { GradeBadge } from "../../../components/GradeBadge.tsx";
import { ZoneBadge } from "../../../components/ZoneBadge.tsx";
import type { AnalysisResult } from "../../../engine/types.ts";
import type { ModelReading } from "../../../engine/motor-model/index.ts";

const METHOD_NAMES: Record<string, string> = {
  eccentricity: "eccentricity lines f ± fr",
  "slot-harmonic": "rotor slot harmonic",
  "vibration-1x": "vibration 1× running speed",
  "pole-pass": "pole-pass frequency",
  "broken-bar-pair": "broken-bar sideband pair",
  nameplate: "nameplate (assumed)",
  slip: "slip method",
  "slip-method": "slip method",
  model: "motor model",
};
export const methodName = (m: string | null | undefined) => (m ? (METHOD_NAMES[m] ?? m.replace(/-/g, " ")) : "—");

export function Row({ label, children, hint }: { label: ReactNode; children: ReactNode; hint?: ReactNode }) {
  return (
    <div className="grid grid-cols-[8.5rem_1fr] items-baseline gap-x-3 border-b border-line py-1.5 last:border-b-0">
      <dt className="text-caption text-ink-muted">{label}</dt>
      <dd className="text-right">
        {children}
        {hint && <div className="text-caption text-ink-faint">{hint}</div>}
      </dd>
    </div>
  );
}

export function Readings({ a }: { a: AnalysisResult }) {
  const bb = a.brokenBar;
  const sf = a.supplyHz && a.slip ? a.slip * a.supplyHz : null;
  return (
    <dl>
      <Row label="Supply">
        <Figure value={a.supplyHz} unit="Hz" digits={3} />
      </Row>
      <Row label="Slip" hint={sf !== null ? <>slip frequency s·f = <span className="num">{sf.toFixed(3)} Hz</span></> : undefined}>
        <Figure value={a.slip === null ? null : a.slip * 100} unit="%" digits={2} />
      </Row>
      <Row label="Speed" hint={a.syncRpm ? <>synchronous <span className="num">{a.syncRpm.toFixed(0)} rpm</span></> : undefined}>
        <Figure value={a.rpm} unit="rpm" digits={1} />
      </Row>
      <Row label="Load" hint={<>estimate · {methodName(a.loadMethod)}</>}>
        <Figure value={a.loadPct} unit="%" digits={0} estimate={methodName(a.loadMethod)} />
      </Row>
      {a.model && <ModelLoadRow m={a.model} />}
      <Row label={<>Lower sideband<br /><span className="num">f − 2sf</span></>} hint={bb.lowerHz !== null ? <>at <span className="num">{bb.lowerHz.toFixed(3)} Hz</span></> : undefined}>
        {bb.lowerDb === null ? "—" : <span className="num">{bb.lowerDb.toFixed(1)} dB <span className="text-ink-muted">below f</span></span>}
      </Row>
      <Row label={<>Upper sideband<br /><span className="num">f + 2sf</span></>} hint={bb.upperHz !== null ? <>at <span className="num">{bb.upperHz.toFixed(3)} Hz</span></> : undefined}>
        {bb.upperDb === null ? "—" : <span className="num">{bb.upperDb.toFixed(1)} dB <span className="text-ink-muted">below f</span></span>}
      </Row>
      <Row label="Rotor grade">
        <GradeBadge grade={bb.grade} assessable={bb.assessable} reason={bb.reason} />
      </Row>
      <div className="py-1.5 text-caption text-ink-muted">
        {bb.assessable ? (
          <>
            Why: graded on the sideband depth <span className="num text-ink">{bb.depthDb?.toFixed(1)} dB</span> below the supply line
            {bb.loadOscillationSuspected && <> · load oscillation suspected: sidebands may come from the load, not the rotor</>}
            {" · confidence "}
            <span className="num text-ink">{Math.round(bb.confidence * 100)} %</span>
          </>
        ) : (
          <>Not assessable: {bb.reason ?? "no reason given"}</>
        )}
        {bb.caveats.length > 0 && (
          <ul className="mt-1 list-disc pl-4">
            {bb.caveats.map((c) => (
              <li key={c}>{c}</li>
            ))}
          </ul>
        )}
      </div>
      <Row label="Broken bars" hint={<>estimate from sideband depth and bar count · confidence <span className="num">{Math.round(bb.confidence * 100)} %</span></>}>
        {bb.estimatedBrokenBars === null ? "—" : <span className="num">≈ {bb.estimatedBrokenBars.toFixed(1)} bars</span>}
      </Row>
      {a.vibration && (
        <>
          <Row label="Vibration" hint={<>{a.vibration.bandHz[0]}–{a.vibration.bandHz[1]} Hz band · group {a.vibration.machineGroup}, {a.vibration.support} support</>}>
            <span className="inline-flex items-center gap-2">
              <Figure value={a.vibration.velocityRmsMmS} unit="mm/s RMS" digits={2} />
              <ZoneBadge zone={a.vibration.zone} withWord />
            </span>
          </Row>
          <Row label="1× running speed" hint={a.vibration.oneXHz !== null ? <span className="num">{a.vibration.oneXHz.toFixed(2)} Hz</span> : undefined}>
            <Figure value={a.vibration.oneXMmS} unit="mm/s" digits={2} />
          </Row>
          <Row label="2× line frequency" hint={a.vibration.twoLineHz !== null ? <span className="num">{a.vibration.twoLineHz.toFixed(2)} Hz</span> : undefined}>
            <Figure value={a.vibration.twoLineMmS} unit="mm/s" digits={2} />
          </Row>
        </>
      )}
    </dl>
  );
}

/** The motor model's load at the measured slip, beside the slip method's, with its output, torque, efficiency and flags. */
function ModelLoadRow({ m }: { m: ModelReading }) {
  const apart = m.apartPct;
  return (
    <Row
      label="Load (motor model)"
      hint={
        <>
          {m.source === "measured" ? "measured circuit" : "circuit estimated from the nameplate"}
          {apart !== null && (
            <>
              {" · "}
              <span className="num">{`${apart >= 0 ? "+" : "\u2212"}${Math.abs(apart).toFixed(1)} pp`}</span> from the slip method
            </>
          )}
          {m.outputKw !== null && (
            <>
              {" · "}
              <span className="num">{m.outputKw.toFixed(1)} kW</span>
              {m.torqueNm !== null && <>, <span className="num">{m.torqueNm.toFixed(0)} N·m</span></>}
              {m.efficiency !== null && <>, η <span className="num">{(m.efficiency * 100).toFixed(1)} %</span></>}
            </>
          )}
          {m.measuredCurrentA !== null && m.modelCurrentA !== null && (
            <>
              {" · current "}
              <span className="num">{m.measuredCurrentA.toFixed(1)} A</span> measured, <span className="num">{m.modelCurrentA.toFixed(1)} A</span> model
            </>
          )}
          {m.flags.map((f) => (
            <div key={f.code} className="text-caution" data-code={f.code}>
              <span aria-hidden="true">◆ </span>
              {f.message}
            </div>
          ))}
        </>
      }
    >
      <Figure value={m.loadPct} unit="%" digits={0} estimate="motor model" />
    </Row>
  );
}

export function SlipEstimates({ a }: { a: AnalysisResult }) {
  if (!a.slipEstimates.length) return <p className="text-ink-muted">No slip estimates.</p>;
  const sorted = [...a.slipEstimates].sort((x, y) => y.confidence - x.confidence);
  return (
    <table className="w-full text-body">
      <caption className="sr-only">Slip estimates by method, with confidence</caption>
      <thead>
        <tr className="text-caption text-ink-muted">
          <th className="py-1 text-left font-medium">Method</th>
          <th className="py-1 text-right font-medium">Slip</th>
          <th className="py-1 text-right font-medium">Speed</th>
          <th className="py-1 text-right font-medium">Confidence</th>
        </tr>
      </thead>
      <tbody>
        {sorted.map((e) => (
          <tr key={e.method + e.slip} className="border-t border-line" title={e.detail}>
            <td className="py-1">{methodName(e.method)}</td>
            <td className="num whitespace-nowrap py-1 pl-2 text-right">{(e.slip * 100).toFixed(2)} %</td>
            <td className="num whitespace-nowrap py-1 pl-2 text-right">{e.rpm.toFixed(0)} rpm</td>
            <td className="whitespace-nowrap py-1 pl-2 text-right">
              <span className="inline-flex items-center gap-1.5">
                <span className="relative inline-block h-1.5 w-8 rounded-full bg-sunken" aria-hidden="true">
                  <span className="absolute inset-y-0 left-0 rounded-full bg-brand" style={{ width: `${Math.round(e.confidence * 100)}%` }} />
                </span>
                <span className="num">{Math.round(e.confidence * 100)} %</span>
              </span>
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const SEVERITY = {
  error: { label: "Error", cls: "border-danger/40 bg-danger-soft text-danger", mark: "✕" },
  warning: { label: "Warning", cls: "border-caution/40 bg-caution-soft text-caution", mark: "!" },
  info: { label: "Note", cls: "border-line bg-sunken text-ink-muted", mark: "i" },
} as const;

export function QualityList({ a }: { a: AnalysisResult }) {
  if (!a.quality.length) return <p className="text-ok">No data-quality problems found.</p>;
  const order = { error: 0, warning: 1, info: 2 } as const;
  return (
    <ul className="flex flex-col gap-1.5">
      {[...a.quality]
        .sort((x, y) => order[x.severity] - order[y.severity])
        .map((q, i) => {
          const s = SEVERITY[q.severity] ?? SEVERITY.info;
          return (
            <li key={q.code + i} className={`flex gap-2 rounded-md border px-2 py-1.5 ${s.cls}`} data-code={q.code}>
              <span aria-hidden="true" className="num mt-0.5 inline-grid size-4 shrink-0 place-items-center rounded-full border border-current text-[0.65rem] font-bold">
                {s.mark}
              </span>
              <span>
                <span className="sr-only">{s.label}: </span>
                {q.message}
                {q.channel && <span className="num ml-1 opacity-80">({q.channel})</span>}
              </span>
            </li>
          );
        })}
    </ul>
  );
}
