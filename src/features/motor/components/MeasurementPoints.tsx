// The motor's measurement points (where a sensor goes: a current phase through a CT, a vibration axis, a voltage
// phase), and for admins adding, editing and deleting them (a deletion asks first).
import { useState } from "react";
import { ErrorNote } from "../../../components/Alert.tsx";
import { Button } from "../../../components/Button.tsx";
import { Dialog } from "../../../components/Dialog.tsx";
import { Field, FormError, Select, TextInput, UnitInput, useZodForm } from "../../../components/Form.tsx";
import type { AssetDetail, MeasurementPoint } from "../../../lib/contracts.ts";
import { POINT_KINDS, type PointKind } from "../../../shared/schemas/points.ts";
import { useCreatePoint, useDeletePoint, useUpdatePoint } from "../api/points.ts";
import { POINT_KIND_LABEL, POINT_POSITIONS, POINT_UNITS, pointFormSchema, pointFormValues, pointSensor, sensitivityUnit, withKind, withStored, type PointFormValues } from "../lib/point-form.ts";

const kindText = (p: MeasurementPoint) => (p.kind === "current" ? "current (CT)" : p.kind);
const positionText = (p: MeasurementPoint) => (p.position ? ` · ${p.kind === "vibration" ? "axis" : "phase"} ${p.position}` : "");

export function MeasurementPoints({ m, canEdit }: { m: AssetDetail; canEdit: boolean }) {
  // The dialog: closed, a new point, or the point being edited.
  const [editing, setEditing] = useState<MeasurementPoint | "new" | null>(null);
  const del = useDeletePoint(m.id);
  const onDelete = (p: MeasurementPoint) => {
    if (confirm(`Delete measurement point ${p.name} of ${m.tag}? Captures taken on it keep their data; they are no longer linked to a point.`)) del.mutate(p.id);
  };
  return (
    <div className="flex flex-col gap-2" data-testid="measurement-points">
      {del.isError && <ErrorNote error={del.error} />}
      {m.measurementPoints.length === 0 ? (
        <p className="text-ink-muted">None recorded.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-line" aria-label={`Measurement points of ${m.tag}`}>
          {m.measurementPoints.map((p) => (
            <li key={p.id} className="flex flex-col gap-0.5 py-1.5">
              <span className="flex items-baseline justify-between gap-2">
                <span className="min-w-0 font-medium">{p.name}</span>
                {canEdit && (
                  <span className="flex shrink-0 items-baseline gap-1">
                    <Button size="sm" variant="ghost" aria-label={`Edit point ${p.name}`} onClick={() => setEditing(p)}>
                      Edit
                    </Button>
                    <Button size="sm" variant="ghost" className="text-danger" aria-label={`Delete point ${p.name}`} disabled={del.isPending} onClick={() => onDelete(p)}>
                      Delete
                    </Button>
                  </span>
                )}
              </span>
              <span className="flex flex-wrap items-baseline justify-between gap-x-2 text-caption text-ink-muted">
                <span>
                  {kindText(p)}
                  {positionText(p)}
                </span>
                <span className="num">{pointSensor(p)}</span>
              </span>
            </li>
          ))}
        </ul>
      )}
      {canEdit && (
        <div>
          <Button size="sm" onClick={() => setEditing("new")}>
            Add point
          </Button>
          <Dialog open={editing !== null} onClose={() => setEditing(null)} title={editing === "new" ? `New measurement point on ${m.tag}` : `Edit point ${editing?.name ?? ""}`}>
            {editing !== null && <PointForm assetId={m.id} point={editing === "new" ? null : editing} onDone={() => setEditing(null)} />}
          </Dialog>
        </div>
      )}
    </div>
  );
}

function PointForm({ assetId, point, onDone }: { assetId: number; point: MeasurementPoint | null; onDone: () => void }) {
  const create = useCreatePoint(assetId);
  const update = useUpdatePoint(assetId);
  const form = useZodForm(pointFormSchema, pointFormValues(point));
  const v = form.values;
  const kind: PointKind = (POINT_KINDS as readonly string[]).includes(v.kind) ? (v.kind as PointKind) : "current";
  const onSubmit = form.submit(async (body) => {
    if (point) await update.mutateAsync({ id: point.id, body });
    else await create.mutateAsync(body);
    onDone();
  });
  const setKind = (k: string) => {
    const next = withKind(v, k);
    for (const key of Object.keys(next) as (keyof PointFormValues)[]) if (next[key] !== v[key]) form.set(key, next[key]);
  };
  const units = withStored(POINT_UNITS[kind].map((u) => ({ value: u, label: u })), v.unit);
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-label={point ? `Edit point ${point.name}` : "New measurement point"}>
      <Field label="Name" error={form.errors.name} hint="e.g. Phase A current, Drive end horizontal">
        {(p) => <TextInput {...p} value={v.name} onChange={(e) => form.set("name", e.target.value)} />}
      </Field>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Kind" error={form.errors.kind}>
          {(p) => (
            <Select {...p} value={v.kind} onChange={(e) => setKind(e.target.value)}>
              {POINT_KINDS.map((k) => (
                <option key={k} value={k}>
                  {POINT_KIND_LABEL[k]}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label={kind === "vibration" ? "Axis" : "Phase"} error={form.errors.position} optional>
          {(p) => (
            <Select {...p} value={v.position} onChange={(e) => form.set("position", e.target.value)}>
              <option value="">Not given</option>
              {withStored(POINT_POSITIONS[kind], v.position).map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </Select>
          )}
        </Field>
        {kind === "current" && (
          <Field label="CT ratio" error={form.errors.ctRatio} optional hint="Primary to secondary, e.g. 100 for 500/5 A">
            {(p) => <UnitInput {...p} unit=": 1" value={v.ctRatio} onChange={(e) => form.set("ctRatio", e.target.value)} />}
          </Field>
        )}
        {kind === "vibration" && (
          <Field label={<>Sensitivity<span className="sr-only"> ({sensitivityUnit(v.unit)})</span></>} error={form.errors.sensitivity} optional hint="From the accelerometer's calibration sheet">
            {(p) => <UnitInput {...p} unit={sensitivityUnit(v.unit)} value={v.sensitivity} onChange={(e) => form.set("sensitivity", e.target.value)} />}
          </Field>
        )}
        <Field label="Unit" error={form.errors.unit}>
          {(p) => (
            <Select {...p} value={v.unit} onChange={(e) => form.set("unit", e.target.value)}>
              {units.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      <FormError message={form.formError} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={form.submitting}>
          {point ? "Save point" : "Add point"}
        </Button>
        <Button onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
