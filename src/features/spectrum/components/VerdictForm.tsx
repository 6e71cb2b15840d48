// An analyst's verdict on the capture's finding: confirm, dismiss or ask for a re-measure, with a note.
// Only rendered for users with verdicts.write; the server enforces it anyway.
import { useState } from "react";
import { Button } from "../../../components/Button.tsx";
import { Field, FormError, TextArea } from "../../../components/Form.tsx";
import { GradeBadge } from "../../../components/GradeBadge.tsx";
import { ZoneBadge } from "../../../components/ZoneBadge.tsx";
import { errorMessage } from "../../../lib/api.ts";
import type { Finding } from "../../../lib/contracts.ts";
import { formatDateTime } from "../../../lib/format.ts";
import { usePostVerdict, VERDICTS, verdictSchema, type VerdictInput } from "../api/post-verdict.ts";

export function FindingLevel({ f }: { f: Pick<Finding, "kind" | "level"> }) {
  return f.kind === "vibration" ? <ZoneBadge zone={f.level} withWord /> : <GradeBadge grade={f.level} compact />;
}

const VERDICT_WORD: Record<string, string> = { confirmed: "Confirmed", dismissed: "Dismissed", remeasure: "Re-measure asked" };

export function VerdictHistory({ f }: { f: Finding }) {
  if (!f.verdicts?.length) return null;
  return (
    <ul className="mt-2 flex flex-col gap-1 text-caption">
      {f.verdicts.map((v) => (
        <li key={v.id} className="rounded-sm bg-sunken px-2 py-1">
          <span className="font-semibold">{VERDICT_WORD[v.verdict] ?? v.verdict}</span>
          {v.analystName && <> by {v.analystName}</>} · {formatDateTime(v.createdAt)}
          {v.note && <p className="text-ink-muted">“{v.note}”</p>}
        </li>
      ))}
    </ul>
  );
}

export function VerdictForm({ finding }: { finding: Finding }) {
  const [values, setValues] = useState<VerdictInput>({ verdict: "confirmed", note: "" });
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const post = usePostVerdict();
  const open = finding.status === "open";

  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    const parsed = verdictSchema.safeParse(values);
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? "Check the form");
      return;
    }
    try {
      await post.mutateAsync({ findingId: finding.id, input: parsed.data });
      setDone(VERDICT_WORD[parsed.data.verdict]);
      setValues({ verdict: "confirmed", note: "" });
    } catch (err) {
      setError(errorMessage(err));
    }
  };

  return (
    <div data-testid="verdict-form">
      <div className="mb-2 flex flex-wrap items-center gap-2">
        <FindingLevel f={finding} />
        <span className="text-caption text-ink-muted">
          {finding.kind === "vibration" ? "Vibration" : "Rotor"} finding #{finding.id} · {finding.status} · raised {formatDateTime(finding.createdAt)}
        </span>
      </div>
      <p className="mb-2">{finding.summary}</p>
      <VerdictHistory f={finding} />
      {open ? (
        <form onSubmit={submit} className="mt-3 flex flex-col gap-3">
          <fieldset className="flex flex-col gap-1.5">
            <legend className="mb-1 text-caption font-medium text-ink-muted">Verdict</legend>
            {VERDICTS.map((v) => (
              <label key={v.value} className="flex cursor-pointer items-start gap-2 rounded-md border border-line px-2 py-1.5 hover:bg-sunken has-checked:border-brand has-checked:bg-brand-soft">
                <input type="radio" name="verdict" className="mt-1" value={v.value} checked={values.verdict === v.value} onChange={() => setValues((x) => ({ ...x, verdict: v.value }))} />
                <span>
                  <span className="font-medium">{v.label}</span>
                  <span className="block text-caption text-ink-muted">{v.help}</span>
                </span>
              </label>
            ))}
          </fieldset>
          <Field label="Note" hint={values.verdict === "confirmed" ? "Optional for a confirmation" : "Required: why"}>
            {(p) => <TextArea {...p} value={values.note} maxLength={4000} onChange={(e) => setValues((x) => ({ ...x, note: e.target.value }))} />}
          </Field>
          <FormError message={error} />
          <div className="flex items-center gap-3">
            <Button type="submit" variant="primary" disabled={post.isPending}>
              {post.isPending ? "Saving…" : "Record verdict"}
            </Button>
            {done && <span role="status" className="text-ok">{done}: saved.</span>}
          </div>
        </form>
      ) : (
        done && <p role="status" className="mt-2 text-ok">{done}: saved.</p>
      )}
    </div>
  );
}
