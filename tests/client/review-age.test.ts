import { describe, expect, it } from "vitest";
import { ageLabel, verdictState } from "../../src/features/review/lib.ts";

describe("how long a finding has waited", () => {
  const now = Date.UTC(2026, 11, 1, 12, 0, 0);
  const ago = (ms: number) => new Date(now - ms).toISOString();
  it("minutes, hours, days, weeks", () => {
    expect(ageLabel(ago(5 * 60_000), now)).toBe("5 min");
    expect(ageLabel(ago(3 * 3_600_000), now)).toBe("3 h");
    expect(ageLabel(ago(47 * 3_600_000), now)).toBe("47 h");
    expect(ageLabel(ago(3 * 86_400_000), now)).toBe("3 d");
    expect(ageLabel(ago(35 * 86_400_000), now)).toBe("5 wk");
  });
  it("a dash without a date", () => {
    expect(ageLabel(null, now)).toBe("—");
    expect(ageLabel("not a date", now)).toBe("—");
  });
});

describe("a finding's verdict in the review queue", () => {
  const v = (verdict: string, analystName: string | null, createdAt: string) => ({ verdict, analystName, createdAt });
  it("the latest verdict in words, with who and when", () => {
    expect(verdictState({ status: "remeasure", verdicts: [v("remeasure", "Tobias Renn", "2026-03-02T10:00:00Z")] })).toEqual({
      waiting: false, verdict: "remeasure", word: "Re-measure asked", by: "Tobias Renn", at: "2026-03-02T10:00:00Z",
    });
    const twice = verdictState({ status: "confirmed", verdicts: [v("remeasure", "Tobias Renn", "2026-03-02T10:00:00Z"), v("confirmed", "Mira Holt", "2026-03-05T09:00:00Z")] });
    expect(twice).toMatchObject({ word: "Confirmed", by: "Mira Holt", at: "2026-03-05T09:00:00Z" });
    expect(verdictState({ status: "dismissed", verdicts: [v("dismissed", null, "2026-03-02T10:00:00Z")] })).toMatchObject({ word: "Dismissed", by: null });
  });
  it("waiting while the finding is open; the status alone when no verdict row came with it", () => {
    expect(verdictState({ status: "open", verdicts: [] })).toEqual({ waiting: true });
    expect(verdictState({ status: "confirmed", verdicts: [] })).toEqual({ waiting: false, verdict: "confirmed", word: "Confirmed", by: null, at: null });
  });
});
