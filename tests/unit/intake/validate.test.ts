// Row checks on a small invented trial: 3 treatments × 3 blocks, one event, depths 0–10 and 10–20 cm.
import { describe, expect, it } from "vitest";
import { autoMapColumns, LOI_KIND } from "~/.server/intake/kinds";
import { missingFields, validateTable, type IntakeContext, type SampleInfo } from "~/.server/intake/validate";
import { ROBUST_Z_LIMIT, outlierScores } from "~/.server/intake/outliers";

const samples = new Map<string, SampleInfo>();
for (const block of [1, 2, 3]) {
  for (const [i, treatment] of ["T1", "T2", "T3"].entries()) {
    for (const [topCm, bottomCm] of [
      [0, 10],
      [10, 20],
    ]) {
      const plotNumber = block * 100 + i + 1;
      const code = `E1-${plotNumber}-${topCm}-${bottomCm}`;
      samples.set(code, { sampleId: code, code, eventId: "ev1", eventLabel: "2026 fall (E1)", plotNumber, block: String(block), treatment, topCm, bottomCm });
    }
  }
}
const context = (): IntakeContext => ({ kind: LOI_KIND, method: { socFactor: 1.724 }, samples, eventDepths: new Map([["ev1", [{ topCm: 0, bottomCm: 10 }, { topCm: 10, bottomCm: 20 }]]]), committed: new Map() });
const headers = LOI_KIND.fields.map((f) => f.header);
const mapping = autoMapColumns(LOI_KIND, headers);
const row = (code: string, crucible: string, dry: string, residue: string, notes = "") => [code, crucible, dry, residue, "550", "4", "", notes];
const check = (rows: string[][]) => validateTable({ headers, rows, rowNumbers: rows.map((_, i) => i + 2) }, mapping, false, context());

describe("validateTable", () => {
  it("maps template headers and lab aliases to fields", () => {
    expect(missingFields(LOI_KIND, mapping)).toEqual([]);
    const alias = autoMapColumns(LOI_KIND, ["Sample ID", "Tare (g)", "Crucible + dry soil (g)", "Crucible + residue (g)", "Temp C", "Hours"]);
    expect(alias).toMatchObject({ sampleCode: 0, crucibleG: 1, crucibleDrySoilG: 2, crucibleResidueG: 3, ignitionC: 4, ignitionHours: 5 });
  });

  it("derives LOI, SOM and SOC for a good row (DESIGN.md worked check)", () => {
    const review = check([row("E1-101-0-10", "20.000", "30.000", "29.500"), row("E1-101-10-20", "20.000", "30.000", "29.600")]);
    expect(review.counts).toEqual({ ok: 2, warning: 0, error: 0 });
    expect(review.rows[0].derived.loi).toBeCloseTo(5, 10); // DESIGN.md: LOI 5.00 %
    expect(review.rows[0].derived.soc).toBeCloseTo(2.9, 2); // DESIGN.md: SOC 2.90 %
  });

  it("names row, column and fix for each kind of error", () => {
    const review = check([
      row("E1-101-0-10", "twenty", "30", "29.5"),
      row("E1-102-0-10", "20", "-30", "29.5"),
      row("E1-103-0-10", "20", "30", "30.5"),
      row("E9-999-0-10", "20", "30", "29.5"),
      row("E1-201-0-10", "20", "30", "29.5"),
      row("e1-201-0-10", "20", "30", "29.4"),
    ]);
    const msg = (i: number) => review.rows[i].messages.map((m) => `${m.column}: ${m.message}`).join(" | ");
    expect(msg(0)).toMatch(/crucible_g: “twenty” is not a number/);
    expect(msg(1)).toMatch(/crucible_dry_soil_g: .*negative/);
    expect(msg(2)).toMatch(/crucible_residue_g: The ignited residue .* heavier than the oven-dry soil/);
    expect(msg(3)).toMatch(/sample_code: Sample code “E9-999-0-10” is not on any sample sheet/);
    expect(msg(4)).toMatch(/also appears on row 7/);
    expect(msg(5)).toMatch(/also appears on row 6/);
    expect(review.counts.error).toBe(6);
  });

  it("refuses a depth gap and a result the sample already has", () => {
    const gap = check([row("E1-101-10-20", "20", "30", "29.6")]);
    expect(gap.rows[0].messages[0].message).toMatch(/Plot 101 in 2026 fall \(E1\): .*starts at 10 cm/);
    const ctx = context();
    ctx.committed.set("E1-101-0-10", { measurementId: "m1", value: 5, source: "“old.csv”" });
    const again = validateTable({ headers, rows: [row("E1-101-0-10", "20", "30", "29.5")], rowNumbers: [2] }, mapping, false, ctx);
    expect(again.rows[0].messages[0].message).toMatch(/already has a Loss on ignition \(LOI\) result \(from “old.csv”\)/);
  });

  it("warns, not errs, for LOI above 40 % and text starting with = in notes", () => {
    // Hand calculation: dry 10 g, ash 5.5 g → LOI 45 % > 40 %.
    const review = check([row("E1-101-0-10", "20", "30", "25.5", "=1+1")]);
    expect(review.rows[0].status).toBe("warning");
    expect(review.rows[0].messages.map((m) => m.message).join(" ")).toMatch(/above 40 %.*never runs it as a spreadsheet formula|never runs it.*above 40 %/s);
  });

  it("flags a value far from the other plots of its treatment before an RCBD can be checked", () => {
    // 3 × 3 at 0–10 cm has 4 error df, too few for the studentized check (|r| ≤ √4 = 2), so the robust z applies.
    // LOI: T1 3.04/3.00/2.96, T3 3.14/3.10/3.06 (%), T2 3.24, 8.00 (plot 202), 3.16 → |deviations from treatment
    // medians| 0.04 0 0.04 | 0 4.76 0.08 | 0.04 0 0.04 → MAD 0.04; z(202) = 0.6745 × 4.76 / 0.04 = 80.3.
    const rows: string[][] = [];
    const loiResidue: Record<string, string> = { T1: "29.700", T2: "29.680", T3: "29.690" };
    // residue = 30 − 10 × (1 − LOI/100) … written directly: block b shifts the residue by (b − 2) × 0.004 g.
    for (const b of [1, 2, 3]) {
      for (const [i, t] of ["T1", "T2", "T3"].entries()) {
        const p = b * 100 + i + 1;
        const residue = p === 202 ? "29.200" : (Number(loiResidue[t]) + (b - 2) * 0.004).toFixed(3);
        rows.push(row(`E1-${p}-0-10`, "20.000", "30.000", residue));
      }
    }
    const review = check(rows);
    const flagged = review.rows.filter((r) => r.status === "warning");
    expect(flagged.map((r) => r.sampleCode)).toEqual(["E1-202-0-10"]);
    expect(flagged[0].messages.at(-1)!.message).toMatch(/robust z 80\.3/);
  });
});

describe("outlierScores (studentized residuals)", () => {
  it("flags one wild plot in a 6 × 4 RCBD (15 error df) at |r| > 3", () => {
    // Invented data: treatment effect 0.5·t, block effect 0.2·b, a small deterministic wobble, and
    // plot (block 2, treatment 3) raised by 3 units. Its studentized residual must exceed 3 (DESIGN.md, Diagnostics).
    const points = [];
    for (let b = 1; b <= 4; b++) {
      for (let t = 1; t <= 6; t++) {
        const wobble = (((b * 7 + t * 3) % 5) - 2) * 0.05;
        points.push({ key: `${b}-${t}`, block: String(b), treatment: `T${t}`, value: 3 + 0.5 * t + 0.2 * b + wobble + (b === 2 && t === 3 ? 3 : 0) });
      }
    }
    const scores = outlierScores(points);
    expect(scores.get("2-3")!.method).toBe("studentized");
    expect(scores.get("2-3")!.score).toBeGreaterThan(3);
    expect([...scores.values()].filter((s) => s.flagged)).toHaveLength(1);
  });
});

describe("outlierScores (robust fallback)", () => {
  it("uses the modified z-score against treatment medians before an RCBD can be fitted", () => {
    // One block only, so no RCBD. Treatment A: 1, 2, 3, 20 → median 2.5; deviations −1.5, −0.5, 0.5, 17.5;
    // pooled MAD = median(|d|) = median(0.5, 0.5, 1.5, 17.5) = 1.0; z(20) = 0.6745 × 17.5 / 1.0 = 11.80
    // (Iglewicz & Hoaglin 1993, limit 3.5).
    const points = [1, 2, 3, 20].map((value, i) => ({ key: `a${i}`, block: "1", treatment: "A", value }));
    const scores = outlierScores(points);
    expect(scores.get("a3")!.method).toBe("robust");
    expect(scores.get("a3")!.score).toBeCloseTo(11.80, 2);
    expect(scores.get("a3")!.flagged).toBe(true);
    expect(Math.abs(scores.get("a0")!.score)).toBeLessThan(ROBUST_Z_LIMIT);
  });

  it("falls back to the mean absolute deviation when the MAD is 0", () => {
    // Values 5, 5, 5, 9: median 5, |d| = 0, 0, 0, 4 → MAD 0; mean |d| = 1; z(9) = 4 / (1.2533 × 1) = 3.19.
    const points = [5, 5, 5, 9].map((value, i) => ({ key: `b${i}`, block: "1", treatment: "A", value }));
    expect(outlierScores(points).get("b3")!.score).toBeCloseTo(3.19, 2);
  });
});
