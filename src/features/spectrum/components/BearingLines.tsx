// The bearing defect lines of a capture beside its spectra: per bearing and defect, the frequency expected at the
// measured speed and the peak found in its search band (level in the channel's unit, in mm/s and in dB over the
// local floor), or "not found". An indication for the analyst; it grades nothing.
import type { BearingLine, BearingsResult } from "../../../engine/types.ts";

/** The lines worth a row: each defect's fundamental, 2×BSF (a rolling-element defect often shows there), and every found harmonic. */
export function shownLines(lines: BearingLine[], defect: string): BearingLine[] {
  return lines.filter((l) => l.harmonic === 1 || (defect === "BSF" && l.harmonic === 2) || l.status === "found");
}

export function BearingLines({ b }: { b: BearingsResult }) {
  return (
    <div className="flex flex-col gap-3" data-testid="bearing-lines">
      <p className="text-caption text-ink-muted">
        An indication, not a grade.
        {b.rpm !== null && (
          <>
            {" "}At the measured <span className="num text-ink">{b.rpm.toFixed(1)} rpm</span>, each line searched from{" "}
            <span className="num">−{b.tolerance.lowPct} %</span> to <span className="num">+{b.tolerance.highPct} %</span> of its expected frequency (real lines sit 1–2 % low).
          </>
        )}
      </p>
      {b.note && <p className="text-caption">{b.note}</p>}
      {b.bearings.map((bearing) => (
        <div key={bearing.position}>
          <p className="mb-1 font-semibold">
            {bearing.position === "DE" ? "Drive end" : "Non-drive end"}
            {bearing.designation && <> <span className="num ml-1 font-normal text-ink-muted">{bearing.designation}</span></>}
          </p>
          <table className="w-full text-caption">
            <thead className="text-ink-muted">
              <tr>
                <th className="py-0.5 text-left font-medium">Line</th>
                <th className="py-0.5 text-right font-medium">Expected</th>
                <th className="py-0.5 text-right font-medium">Found</th>
              </tr>
            </thead>
            <tbody>
              {bearing.defects.flatMap((d) =>
                d.lines.length === 0
                  ? [
                      <tr key={d.defect} className="border-t border-line">
                        <td className="py-0.5">{d.defect}</td>
                        <td className="num py-0.5 text-right">{d.expectedHz !== null ? `${d.expectedHz.toFixed(2)} Hz` : `${d.orderOfShaft.toFixed(3)}× fr`}</td>
                        <td className="py-0.5 text-right text-ink-faint">not searched</td>
                      </tr>,
                    ]
                  : shownLines(d.lines, d.defect).flatMap((l) => [
                      <tr key={l.label} className="border-t border-line">
                        <td className="num py-0.5 whitespace-nowrap">{l.label.replace(` ${bearing.position}`, "")}</td>
                        <td className="num py-0.5 text-right whitespace-nowrap">{l.expectedHz.toFixed(2)} Hz</td>
                        <td className="py-0.5 text-right whitespace-nowrap">
                          {l.status === "found" ? (
                            <span className="num font-semibold">{l.foundHz!.toFixed(2)} Hz</span>
                          ) : (
                            <span className="text-ink-muted" title={l.note}>
                              {l.status}
                            </span>
                          )}
                        </td>
                      </tr>,
                      ...(l.status === "found"
                        ? [
                            <tr key={`${l.label}-level`}>
                              <td colSpan={3} className="num pb-1 text-right text-ink-muted">
                                {l.level} {l.unit} r.m.s. ({l.velocityMmS!.toFixed(3)} mm/s) · {l.dbOverFloor!.toFixed(1)} dB over floor · on {l.channel}
                              </td>
                            </tr>,
                          ]
                        : []),
                    ]),
              )}
            </tbody>
          </table>
        </div>
      ))}
    </div>
  );
}
