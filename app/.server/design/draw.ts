// Drawing a layout for a trial's design with the layout library: pure, no database.
import {
  completelyRandomizedLayout,
  factorialRcbdLayout,
  rcbdLayout,
  splitPlotLayout,
  type FieldArrangement,
  type FieldLayout,
  type TrialDesign,
} from "../../../analysis/design";
import { DesignError } from "./errors";

type DbDesign = "crd" | "rcbd" | "factorial_rcbd" | "split_plot";

/** Factors in the order layouts need: split-plot main before sub, otherwise as entered. */
export function orderedFactors<F extends { stratum: "main" | "sub" | null; position: number }>(factors: readonly F[]): F[] {
  return [...factors].sort((a, b) => (a.stratum === b.stratum ? a.position - b.position : a.stratum === "main" ? -1 : 1));
}

/** The one place the database's design names meet the layout library's. */
const LAYOUT_DESIGN: Record<DbDesign, TrialDesign> = {
  crd: "completely_randomized",
  rcbd: "rcbd",
  factorial_rcbd: "factorial_rcbd",
  split_plot: "split_plot",
};

export function layoutDesignOf(design: DbDesign): TrialDesign {
  return LAYOUT_DESIGN[design];
}

type Factor = { name: string; levels: string[]; stratum: "main" | "sub" | null; position: number };

/** Draws the layout for a trial's design with the layout library; refusals name what is missing. */
export function drawLayout(
  trial: { design: DbDesign },
  treatments: readonly { code: string; factorLevels: Record<string, string> | null }[],
  factors: readonly Factor[],
  { blockCount, arrangement, seed }: { blockCount: number; arrangement: FieldArrangement; seed: number },
): FieldLayout {
  if (treatments.length < 2) throw new DesignError("Add at least two treatments before randomizing.");
  const codes = treatments.map((t) => t.code);
  switch (layoutDesignOf(trial.design)) {
    case "completely_randomized":
      return completelyRandomizedLayout({ treatments: codes, replicates: blockCount, seed, arrangement });
    case "rcbd":
      return rcbdLayout({ treatments: codes, blocks: blockCount, seed, arrangement });
    case "factorial_rcbd": {
      const ordered = orderedFactors(factors);
      if (ordered.length === 0) throw new DesignError("A factorial design needs its factors; add them on the Treatments page.");
      assertTreatmentsMatchFactors(codes, ordered);
      return factorialRcbdLayout({ factors: ordered, blocks: blockCount, seed, arrangement });
    }
    case "split_plot": {
      const main = factors.find((f) => f.stratum === "main");
      const sub = factors.find((f) => f.stratum === "sub");
      if (!main || !sub) throw new DesignError("A split-plot design needs a main-plot factor and a sub-plot factor; add them on the Treatments page.");
      assertTreatmentsMatchFactors(codes, [main, sub]);
      return splitPlotLayout({ mainFactor: main, subFactor: sub, blocks: blockCount, seed, arrangement });
    }
  }
}

function assertTreatmentsMatchFactors(codes: readonly string[], factors: readonly Factor[]) {
  const expected = factors.reduce((n, f) => n * f.levels.length, 1);
  if (codes.length !== expected) {
    throw new DesignError(
      `The factors give ${expected} combinations but the trial has ${codes.length} treatments. Generate the treatments from the factors on the Treatments page.`,
    );
  }
}

/** Where a numbered plot lies on the field grid: blocks as rows or as columns. */
export function fieldCell(plot: { strip: number; column: number }, orientation: "rows" | "columns") {
  return orientation === "rows"
    ? { fieldRow: plot.strip - 1, fieldColumn: plot.column - 1 }
    : { fieldRow: plot.column - 1, fieldColumn: plot.strip - 1 };
}

