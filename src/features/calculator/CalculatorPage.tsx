// The motor-model calculator (/calculator): an equivalent circuit in, its operating point at a slip and its
// torque–speed and current–speed curves with starting, pull-up and breakdown points out.
import { useEffect, type ReactNode } from "react";
import { Button } from "../../components/Button.tsx";
import { Alert } from "../../components/Alert.tsx";
import { Field, FormError, Select, TextInput, useZodForm } from "../../components/Form.tsx";
import { Page, Section } from "../../components/Page.tsx";
import { CurveChart, type AnnotatedPoint } from "../../components/charts/CurveChart.tsx";
import { calculatorSchema, EXAMPLE, useEvaluate, type CalculatorResult, type CalculatorValues } from "./api/evaluate.ts";

type NumField = Exclude<keyof CalculatorValues, "connection">;
const FIELDS: { name: NumField; label: ReactNode; unit: string; hint?: string; optional?: boolean }[] = [
  { name: "lineVoltage", label: "Line voltage", unit: "V", hint: "line-to-line, RMS" },
  { name: "frequencyHz", label: "Frequency", unit: "Hz" },
  { name: "poles", label: "Poles", unit: "" },
  { name: "r1", label: <>Stator resistance R<sub>1</sub></>, unit: "Ω" },
  { name: "x1", label: <>Stator leakage X<sub>1</sub></>, unit: "Ω" },
  { name: "r2", label: <>Rotor resistance R<sub>2</sub></>, unit: "Ω", hint: "referred to the stator" },
  { name: "x2", label: <>Rotor leakage X<sub>2</sub></>, unit: "Ω", hint: "referred to the stator" },
  { name: "xm", label: <>Magnetising X<sub>m</sub></>, unit: "Ω" },
  { name: "rc", label: <>Core-loss R<sub>c</sub></>, unit: "Ω", optional: true, hint: "empty: core loss is in the rotational losses" },
  { name: "rotorLockedR2", label: <>R<sub>2</sub> at standstill</>, unit: "Ω", optional: true, hint: "deep-bar rotor; empty: R2 constant" },
  { name: "rotorLockedX2", label: <>X<sub>2</sub> at standstill</>, unit: "Ω", optional: true, hint: "deep-bar rotor; empty: X2 constant" },
  { name: "rotationalLossW", label: "Rotational losses", unit: "W", optional: true, hint: "friction, windage (and core)" },
  { name: "slip", label: "Slip", unit: "", optional: true, hint: "per unit, e.g. 0.022; empty: curves only" },
];

export default function CalculatorPage() {
  const form = useZodForm(calculatorSchema, EXAMPLE);
  const evaluate = useEvaluate();
  const submit = form.submit((input) => evaluate.mutateAsync(input));
  useEffect(() => {
    void submit();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);
  const r = evaluate.data;

  return (
    <Page wide title="Motor-model calculator" description="Per-phase equivalent circuit of a three-phase induction motor, all values per phase and referred to the stator.">
      <div className="grid gap-4 xl:grid-cols-[22rem_minmax(0,1fr)]">
        <Section title="Circuit">
          <form onSubmit={submit} className="flex flex-col gap-3" noValidate>
            <div className="grid grid-cols-2 gap-3">
              {FIELDS.slice(0, 3).map((f) => (
                <NumberField key={f.name} f={f} form={form} />
              ))}
              <Field label="Connection" error={form.errors.connection}>
                {(p) => (
                  <Select {...p} value={form.values.connection} onChange={(e) => form.set("connection", e.target.value as "star" | "delta")}>
                    <option value="star">star (Y)</option>
                    <option value="delta">delta (Δ)</option>
                  </Select>
                )}
              </Field>
              {FIELDS.slice(3).map((f) => (
                <NumberField key={f.name} f={f} form={form} />
              ))}
            </div>
            <FormError message={form.formError} />
            <div className="flex gap-2">
              <Button type="submit" variant="primary" disabled={form.submitting}>
                {form.submitting ? "Computing…" : "Compute"}
              </Button>
              <Button onClick={() => form.reset(EXAMPLE)}>Example motor</Button>
            </div>
          </form>
        </Section>
        <div className="flex min-w-0 flex-col gap-4">
          {evaluate.isError && !form.formError && <Alert tone="error">{(evaluate.error as Error).message}</Alert>}
          {r && Object.keys(form.errors).length > 0 && (
            <Alert tone="caution">The results below are for the last circuit that computed; correct the marked fields to update them.</Alert>
          )}
          {r ? <Results r={r} /> : <p className="text-ink-muted">Enter a circuit and compute.</p>}
        </div>
      </div>
    </Page>
  );
}

function NumberField({ f, form }: { f: (typeof FIELDS)[number]; form: ReturnType<typeof useZodForm<typeof calculatorSchema, CalculatorValues>> }) {
  return (
    <Field label={<>{f.label}{f.unit && <span className="num"> ({f.unit})</span>}</>} error={form.errors[f.name]} hint={f.hint} optional={f.optional}>
      {(p) => <TextInput {...p} inputMode="decimal" className="num text-right" value={form.values[f.name]} onChange={(e) => form.set(f.name, e.target.value)} />}
    </Field>
  );
}

function Results({ r }: { r: CalculatorResult }) {
  const { curves: c, point } = r;
  const keyMarks = (y: "torqueNm" | "currentA", unit: string, digits: number): AnnotatedPoint[] => {
    const pts: AnnotatedPoint[] = [
      { x: c.start.rpm, y: c.start[y], color: "#1c1e20", shape: "ring", label: `start ${c.start[y].toFixed(digits)} ${unit}` },
      { x: c.breakdown.rpm, y: c.breakdown[y], color: "#1c1e20", shape: "ring", label: `breakdown ${c.breakdown[y].toFixed(digits)} ${unit}` },
    ];
    if (Math.abs(c.pullUp.rpm - c.start.rpm) > 1) pts.push({ x: c.pullUp.rpm, y: c.pullUp[y], color: "#1c1e20", shape: "ring", label: `pull-up ${c.pullUp[y].toFixed(digits)} ${unit}` });
    if (point) {
      const v = y === "torqueNm" ? point.inducedTorqueNm : point.statorCurrentA;
      pts.push({ x: point.rpm, y: v, color: "#ad5228", size: 5, label: `s = ${point.slip} · ${v.toFixed(digits)} ${unit}` });
    }
    return pts;
  };
  const rpmMax = c.curves.rpm[c.curves.rpm.length - 1];
  const sync = (120 * r.input.frequencyHz) / r.input.poles;
  return (
    <>
      {point && (
        <Section title={<>Operating point at slip <span className="num">{point.slip}</span></>}>
          {point.flags.map((f) => (
            <div key={f.code} className="mb-2">
              <Alert tone={f.severity === "error" ? "error" : "caution"}>{f.message}</Alert>
            </div>
          ))}
          <div className="grid gap-x-8 sm:grid-cols-2 lg:grid-cols-3">
            <Out label="Speed" v={point.rpm} unit="rpm" d={1} />
            <Out label="Line current" v={point.statorCurrentA} unit="A" d={2} />
            <Out label="Phase current" v={point.phaseCurrentA} unit="A" d={2} />
            <Out label="Power factor" v={point.powerFactor} unit="lagging" d={3} />
            <Out label="Input power" v={point.inputPowerW / 1000} unit="kW" d={2} />
            <Out label="Stator copper loss" v={point.statorCopperLossW} unit="W" d={0} />
            <Out label="Core loss (Rc)" v={point.coreLossW} unit="W" d={0} />
            <Out label="Air-gap power" v={point.airGapPowerW / 1000} unit="kW" d={2} />
            <Out label="Rotor copper loss" v={point.rotorCopperLossW} unit="W" d={0} />
            <Out label="Converted power" v={point.convertedPowerW / 1000} unit="kW" d={2} />
            <Out label="Output power" v={point.outputPowerW / 1000} unit="kW" d={2} />
            <Out label="Efficiency" v={point.efficiency * 100} unit="%" d={1} />
            <Out label="Induced torque" v={point.inducedTorqueNm} unit="N·m" d={1} />
            <Out label="Load (shaft) torque" v={point.loadTorqueNm} unit="N·m" d={1} />
          </div>
        </Section>
      )}
      <Section title="Starting, pull-up and breakdown">
        <div className="grid gap-x-8 sm:grid-cols-2 lg:grid-cols-3">
          <Out label="Starting torque" v={c.start.torqueNm} unit="N·m" d={1} />
          <Out label="Starting current" v={c.start.currentA} unit="A" d={1} />
          <Out label="Pull-up torque" v={c.pullUp.torqueNm} unit="N·m" d={1} hint={Math.abs(c.pullUp.rpm - c.start.rpm) < 1 ? "no dip on the way up: equals the start" : `at ${c.pullUp.rpm.toFixed(0)} rpm`} />
          <Out label="Breakdown torque" v={c.breakdown.torqueNm} unit="N·m" d={1} hint={c.breakdown.beyondStandstill ? "maximum lies beyond standstill (s > 1)" : undefined} />
          <Out label="Breakdown slip" v={c.breakdown.slip} unit="" d={4} hint={`${c.breakdown.rpm.toFixed(0)} rpm`} />
          <Out label="Synchronous speed" v={sync} unit="rpm" d={0} />
        </div>
        <p className="mt-2 text-caption text-ink-muted">
          Cross-check, Thevenin closed form: exact <span className="num">{c.thevenin.exact.tauMax.toFixed(1)} N·m</span> at s ={" "}
          <span className="num">{c.thevenin.exact.sMax.toFixed(4)}</span>; approximate (R<sub>c</sub> ignored, X<sub>th</sub> ≈ X<sub>1</sub>){" "}
          <span className="num">{c.thevenin.approximate.tauMax.toFixed(1)} N·m</span> at s = <span className="num">{c.thevenin.approximate.sMax.toFixed(4)}</span>.
        </p>
      </Section>
      <Section title="Curves">
        <div className="grid gap-4 2xl:grid-cols-2">
          <div className="min-w-0">
            <h3 className="mb-1 font-semibold">Torque–speed</h3>
            <CurveChart
              x={c.curves.rpm}
              series={[{ label: "induced torque", values: c.curves.torqueNm, color: "#084c4e", width: 2 }]}
              xLabel="Speed (rpm)"
              yLabel="Torque (N·m)"
              yDigits={0}
              xRange={[0, rpmMax]}
              points={keyMarks("torqueNm", "N·m", 0)}
              label="Torque against speed"
            />
          </div>
          <div className="min-w-0">
            <h3 className="mb-1 font-semibold">Current–speed</h3>
            <CurveChart
              x={c.curves.rpm}
              series={[{ label: "line current", values: c.curves.currentA, color: "#084c4e", width: 2 }]}
              xLabel="Speed (rpm)"
              yLabel="Line current (A)"
              yDigits={0}
              xRange={[0, rpmMax]}
              points={keyMarks("currentA", "A", 0)}
              label="Current against speed"
            />
          </div>
        </div>
      </Section>
    </>
  );
}

function Out({ label, v, unit, d, hint }: { label: string; v: number | null; unit: string; d: number; hint?: string }) {
  return (
    <div className="flex items-baseline justify-between gap-3 border-b border-line py-1.5">
      <span className="text-caption text-ink-muted">
        {label}
        {hint && <span className="block text-ink-faint">{hint}</span>}
      </span>
      <span className="num whitespace-nowrap">
        {v === null || !Number.isFinite(v) ? "—" : v.toFixed(d).replace("-", "\u2212")}
        {unit && <span className="ml-1 text-ink-muted">{unit}</span>}
      </span>
    </div>
  );
}
