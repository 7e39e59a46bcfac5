// Field-brief sentences say what the numbers say, and the rows carry the same numbers.
import { describe, expect, it } from "vitest";
import { briefRows, briefSentence, type BriefSection } from "../../analysis/briefs";
import type { ResultsPayload } from "../../analysis/results";

const results = {
  means: [
    { code: "T1", name: "Untreated check", isCheck: true, n: 4, mean: 3.2, se: 0.08, group: "c", vsCheck: null },
    { code: "T2", name: "Yard-waste compost", isCheck: false, n: 4, mean: 3.8, se: 0.08, group: "a", vsCheck: { diff: 0.6, se: 0.11, lower: 0.2, upper: 1.0, p: 0.004, significant: true } },
    { code: "T4", name: "Sheet mulch", isCheck: false, n: 4, mean: 3.3, se: 0.08, group: "bc", vsCheck: { diff: 0.1, se: 0.11, lower: -0.3, upper: 0.5, p: 0.8, significant: false } },
  ],
} as unknown as ResultsPayload;

describe("field-brief rows", () => {
  it("computes change from baseline, absolute and %", () => {
    const rows = briefRows(results, new Map([["T1", 3.0], ["T2", 3.0], ["T4", 3.2]]));
    const t2 = rows.find((r) => r.code === "T2")!;
    expect(t2.change).toBeCloseTo(0.8, 10); // 3.8 − 3.0 (hand calculation)
    expect(t2.changePercent).toBeCloseTo(26.667, 2); // 0.8 / 3.0 × 100 (hand calculation)
    expect(t2.vsCheck).toMatchObject({ diff: 0.6, lower: 0.2, upper: 1.0 });
  });

  it("leaves change empty without a baseline", () => {
    expect(briefRows(results, new Map()).every((r) => r.change === null && r.changePercent === null)).toBe(true);
  });
});

describe("field-brief sentence", () => {
  const section: Omit<BriefSection, "sentence"> = {
    variable: { id: "som", label: "Soil organic matter", unit: "%", siUnit: "percent", decimals: 1 },
    depthLabel: "0–10 cm",
    season: "2027 fall",
    baselineSeason: "2025 spring",
    method: "tukey",
    alpha: 0.05,
    rows: briefRows(results, new Map()),
    chart: [],
  };

  it("names the raised treatment with its interval and the ones that did not differ", () => {
    const text = briefSentence(section);
    expect(text).toContain(
      "In 2027 fall, Yard-waste compost raised soil organic matter in 0–10 cm by 0.6 percentage points compared with the untreated check (95 % CI 0.2 to 1.0).",
    );
    expect(text).toContain("Sheet mulch did not differ from the check.");
    expect(text).toContain("Tukey–Kramer comparisons at α = 0.05");
  });

  it("says lowered for a negative significant difference", () => {
    const lowered = {
      ...section,
      rows: section.rows.map((r) => (r.code === "T2" ? { ...r, vsCheck: { diff: -0.6, lower: -1.0, upper: -0.2, p: 0.01, significant: true } } : r)),
    };
    expect(briefSentence(lowered)).toContain("Yard-waste compost lowered soil organic matter in 0–10 cm by 0.6 percentage points");
  });
});
