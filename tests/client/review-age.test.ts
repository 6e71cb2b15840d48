import { describe, expect, it } from "vitest";
import { ageLabel } from "../../src/features/review/lib.ts";

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
