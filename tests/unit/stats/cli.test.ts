import { describe, expect, it } from "vitest";
import { formatReport, parseArguments, report } from "../../../analysis/cli";
import { montgomeryEx41Rows } from "./published-data";

/** Montgomery, DAE Example 4.1 as a tidy CSV, optionally with one response cell left empty. */
function ex41Csv(blankPressure1Batch3 = false): string {
  const lines = ["batch,pressure,yield"];
  montgomeryEx41Rows.forEach((row, i) =>
    row.forEach((v, j) => lines.push(`${j + 1},P${i + 1},${blankPressure1Batch3 && i === 0 && j === 2 ? "" : v}`)),
  );
  return lines.join("\n");
}

const args = ["--input", "ex41.csv", "--response", "yield", "--treatment", "pressure", "--block", "batch"];

type Row = { source: string; ss: number; df: number; f: number | null };

describe("command-line report", () => {
  it("reproduces Montgomery, DAE Example 4.1 from a CSV", () => {
    const out = report(parseArguments([...args, "--method", "lsd"]), ex41Csv());
    const anova = out.anova as Row[];
    expect(out.model).toBe("rcbd");
    expect(anova.map((r) => r.source)).toEqual(["block", "treatment", "residual", "total"]);
    expect(anova[1].ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(anova[1].f).toBeCloseTo(8.107, 3); // Montgomery, DAE Ex 4.1: F0 = 8.107
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    expect(out.lsd).toBeCloseTo(2.131 * Math.sqrt((2 * mse) / 6), 2); // standard tables: t0.975,15 = 2.131
    expect((out.means as { group: string }[]).map((m) => m.group)).toEqual(["a", "ab", "bc", "c"]);
    expect((out.comparisons as unknown[]).length).toBe(6);
    expect(formatReport(out)).toContain("rcbd ANOVA of yield");
  });

  it("treats an empty response cell as missing (DESIGN.md missing-plot values)", () => {
    const out = report(parseArguments(args), ex41Csv(true));
    const anova = out.anova as Row[];
    expect(anova[1].ss).toBeCloseTo(136.996, 3); // DESIGN.md (Montgomery Ex 4.1 drop 98.2): adjusted SS treatment 136.996
    expect(anova[2].df).toBe(14); // DESIGN.md: SS error on 14 df
    expect((out.missing as { estimate: number }[])[0].estimate).toBeCloseTo(91.513, 3); // DESIGN.md: x = 91.513
    expect(out.hsd).toBeNull(); // unequal SEs once a plot is missing
  });

  it("tests contrasts given on the command line", () => {
    const out = report(parseArguments([...args, "--contrast", "1+2 vs 3+4=1,1,-1,-1"]), ex41Csv());
    const [c] = out.contrasts as { name: string; df: number; estimate: number }[];
    expect(c.name).toBe("1+2 vs 3+4");
    expect(c.df).toBe(15);
    const means = montgomeryEx41Rows.map((r) => r.reduce((s, v) => s + v, 0) / 6);
    expect(c.estimate).toBeCloseTo(means[0] + means[1] - means[2] - means[3], 10);
  });

  it("gives a one-line reason for bad input", () => {
    expect(() => report(parseArguments([...args.slice(0, 6), "--block", "field"]), ex41Csv())).toThrow(
      'the file has no column "field"',
    );
    const oneBlock = ex41Csv().split("\n").filter((l, i) => i === 0 || l.startsWith("1,")).join("\n");
    expect(() => report(parseArguments(args), oneBlock)).toThrow("needs at least 2 levels of block");
    expect(() => report(parseArguments(args), ex41Csv().replace("90.3", "n/a"))).toThrow('row 2: yield "n/a" is not a number');
    const gap = ex41Csv().split("\n").filter((l) => l !== "3,P2,90.6").join("\n");
    expect(() => report(parseArguments(args), gap)).toThrow("block 3 has no plot for treatment P2");
    expect(() => parseArguments(["--input", "x.csv", "--response", "y"])).toThrow("give exactly one of");
    expect(() => parseArguments([...args, "--method", "scheffe"])).toThrow("--method must be tukey or lsd");
  });
});
