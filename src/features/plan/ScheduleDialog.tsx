import { useEffect, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Dialog } from "../../components/Dialog.tsx";
import { Field, FormError, Select, TextArea, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import type { Finding } from "../../lib/contracts.ts";
import { PRIORITIES, scheduleSchema, suggestDueDate, suggestPriority, todayIso } from "../../lib/inspections.ts";
import { parseGrade } from "../../lib/grades.ts";
import { motorPickerQueryOptions, techniciansQueryOptions, useScheduleInspection } from "./api/inspections.ts";

/** Schedule an inspection, from a finding (motor and priority filled in) or from scratch. */
export function ScheduleDialog({ open, onClose, finding }: { open: boolean; onClose: () => void; finding?: Finding | null }) {
  return (
    <Dialog open={open} onClose={onClose} title="Schedule an inspection" wide>
      {open && <ScheduleForm finding={finding ?? null} onDone={onClose} />}
    </Dialog>
  );
}

function initialValues(finding: Finding | null) {
  const priority = finding ? suggestPriority(finding) : "normal";
  return {
    assetId: finding ? String(finding.assetId) : "",
    findingId: finding ? String(finding.id) : "",
    title: finding ? `Inspect ${finding.assetTag}: ${finding.summary}`.slice(0, 200) : "",
    instructions: finding
      ? "Check the motor's condition on site. Take a fresh current capture at normal load if you can, and note anything unusual (noise, heat, vibration)."
      : "",
    dueDate: suggestDueDate(priority),
    assigneeId: "",
    priority: priority as string,
  };
}

function ScheduleForm({ finding, onDone }: { finding: Finding | null; onDone: () => void }) {
  const form = useZodForm(scheduleSchema, initialValues(finding));
  const technicians = useQuery(techniciansQueryOptions());
  const [motorQuery, setMotorQuery] = useState("");
  const motors = useQuery(motorPickerQueryOptions(motorQuery, !finding));
  const schedule = useScheduleInspection();
  const [dueTouched, setDueTouched] = useState(false);

  // Until the planner picks a date, the due date follows the priority.
  useEffect(() => {
    if (!dueTouched && form.values.priority) form.set("dueDate", suggestDueDate(form.values.priority as never));
  }, [form.values.priority]); // eslint-disable-line react-hooks/exhaustive-deps

  const onSubmit = form.submit(async (data) => {
    await schedule.mutateAsync(data);
    onDone();
  });

  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2">
      {finding ? (
        <div className="rounded-md border border-line bg-sunken/50 p-3 sm:col-span-2">
          <p className="text-caption text-ink-muted">From finding</p>
          <p className="flex flex-wrap items-center gap-2 font-medium">
            <span className="num">{finding.assetTag}</span> {finding.assetName}
            {parseGrade(finding.level) ? <GradeBadge compact grade={finding.level} /> : <ZoneBadge zone={finding.level} withWord />}
          </p>
          <p className="text-ink-muted">{finding.summary}</p>
        </div>
      ) : (
        <>
          <Field label="Find a motor" className="sm:col-span-1">
            {(p) => <TextInput {...p} type="search" placeholder="Tag or name" value={motorQuery} onChange={(e) => setMotorQuery(e.target.value)} />}
          </Field>
          <Field label="Motor" error={form.errors.assetId}>
            {(p) => (
              <Select {...p} value={form.values.assetId} onChange={(e) => form.set("assetId", e.target.value)}>
                <option value="">{motors.isPending ? "Loading…" : "Pick a motor"}</option>
                {motors.data?.map((a) => (
                  <option key={a.id} value={a.id}>
                    {a.tag} · {a.name} ({a.siteName})
                  </option>
                ))}
              </Select>
            )}
          </Field>
        </>
      )}
      <Field label="Title" error={form.errors.title} className="sm:col-span-2">
        {(p) => <TextInput {...p} value={form.values.title} onChange={(e) => form.set("title", e.target.value)} />}
      </Field>
      <Field label="Priority" error={form.errors.priority} hint={finding ? `Suggested from the finding: ${PRIORITIES.find((x) => x.value === suggestPriority(finding))?.label}.` : undefined}>
        {(p) => (
          <Select {...p} value={form.values.priority} onChange={(e) => form.set("priority", e.target.value)}>
            {PRIORITIES.map((x) => (
              <option key={x.value} value={x.value}>
                {x.label} (within {x.days} days)
              </option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="Due date" error={form.errors.dueDate}>
        {(p) => (
          <TextInput
            {...p}
            type="date"
            className="num"
            min={todayIso()}
            value={form.values.dueDate}
            onChange={(e) => {
              setDueTouched(true);
              form.set("dueDate", e.target.value);
            }}
          />
        )}
      </Field>
      <Field label="Technician" error={form.errors.assigneeId} className="sm:col-span-2">
        {(p) => (
          <Select {...p} value={form.values.assigneeId} onChange={(e) => form.set("assigneeId", e.target.value)}>
            <option value="">{technicians.isPending ? "Loading…" : "Pick a technician"}</option>
            {technicians.data?.map((t) => (
              <option key={t.id} value={t.id}>
                {t.name}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="Instructions" optional error={form.errors.instructions} className="sm:col-span-2">
        {(p) => <TextArea {...p} rows={4} value={form.values.instructions} onChange={(e) => form.set("instructions", e.target.value)} />}
      </Field>
      <div className="sm:col-span-2">
        <FormError message={form.formError} />
      </div>
      <div className="flex justify-end gap-2 sm:col-span-2">
        <Button onClick={onDone}>Cancel</Button>
        <Button type="submit" variant="primary" disabled={form.submitting}>
          {form.submitting ? "Scheduling…" : "Schedule"}
        </Button>
      </div>
    </form>
  );
}
