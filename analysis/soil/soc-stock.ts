import { contiguousDepthIncrements, type DepthIncrement } from "./depth-increments";
import { MeasurementError, requireNonNegative, requirePositive } from "./errors";

/**
 * SOC stock at fixed depth, Mg C/ha: stock = SOC % × BD_fine (g/cm³) × thickness (cm).
 * (SOC/100 · BD · t gives g C per cm²; × 10⁸ cm²/ha ÷ 10⁶ g/Mg = × 100, which cancels the /100.)
 * Source: fine-earth BD per Poeplau, Vos & Don 2017, SOIL 3:61–66; DESIGN.md worked check
 * 2 % × 1.3 × 30 cm = 78 Mg C/ha.
 */
export function socStockMgPerHa(socPercent: number, bdFineGPerCm3: number, thicknessCm: number): number {
  requireNonNegative(socPercent, "SOC (%)", "socPercent");
  requireNonNegative(bdFineGPerCm3, "Fine-earth bulk density (g/cm³)", "bdFineGPerCm3");
  requirePositive(thicknessCm, "Increment thickness (cm)", "thicknessCm");
  return socPercent * bdFineGPerCm3 * thicknessCm;
}

/**
 * Fine-earth soil mass of a layer, Mg/ha: M = BD_fine (g/cm³) × thickness (cm) × 100.
 * Source: Ellert & Bettany 1995, Can. J. Soil Sci. 75:529–538 (same unit algebra as the stock).
 */
export function fineEarthMassMgPerHa(bdFineGPerCm3: number, thicknessCm: number): number {
  requireNonNegative(bdFineGPerCm3, "Fine-earth bulk density (g/cm³)", "bdFineGPerCm3");
  requirePositive(thicknessCm, "Increment thickness (cm)", "thicknessCm");
  return bdFineGPerCm3 * thicknessCm * 100;
}

/** One depth increment of one core with the two values stocks need. */
export interface CoreIncrement extends DepthIncrement {
  bdFineGPerCm3: number;
  socPercent: number;
}

export interface ProfileRow extends DepthIncrement {
  fineEarthMassMgPerHa: number;
  socStockMgPerHa: number;
  cumulativeMassMgPerHa: number;
  cumulativeSocStockMgPerHa: number;
}

/**
 * Per-increment and cumulative (from the surface) fine-earth mass and fixed-depth SOC stock for one
 * core, top down. Increments must be contiguous from 0 cm.
 * Source: cumulative mass coordinates of Ellert & Bettany 1995; Wendt & Hauser 2013,
 * Eur. J. Soil Sci. 64:58–65.
 */
export function cumulativeSocProfile(increments: readonly CoreIncrement[]): ProfileRow[] {
  let mass = 0;
  let carbon = 0;
  return contiguousDepthIncrements(increments).map((d) => {
    const thickness = d.bottomCm - d.topCm;
    const layerMass = fineEarthMassMgPerHa(d.bdFineGPerCm3, thickness);
    const layerStock = socStockMgPerHa(d.socPercent, d.bdFineGPerCm3, thickness);
    mass += layerMass;
    carbon += layerStock;
    return {
      topCm: d.topCm,
      bottomCm: d.bottomCm,
      fineEarthMassMgPerHa: layerMass,
      socStockMgPerHa: layerStock,
      cumulativeMassMgPerHa: mass,
      cumulativeSocStockMgPerHa: carbon,
    };
  });
}

/** Throws unless every increment carries some fine-earth mass (ESM needs strictly increasing mass). */
function requireMassInEveryIncrement(rows: readonly ProfileRow[], coreLabel: string): void {
  for (const r of rows) {
    if (r.fineEarthMassMgPerHa <= 0) {
      throw new MeasurementError(
        `${coreLabel}: increment ${r.topCm}–${r.bottomCm} cm has no fine-earth mass, so an equivalent-soil-mass stock cannot be placed in it.`,
        "bdFineGPerCm3",
      );
    }
  }
}

/**
 * Default ESM reference mass, Mg/ha: the smallest deepest-cumulative fine-earth mass over all cores
 * (of all seasons), so every core reaches it and none is extrapolated.
 * Source: DESIGN.md; the principle of a common reference mass is Ellert & Bettany 1995 and
 * von Haden, Yang & DeLucia 2020, Global Change Biology 26:3759–3770.
 */
export function esmReferenceMassMgPerHa(cores: readonly (readonly CoreIncrement[])[]): number {
  if (cores.length === 0) throw new MeasurementError("A reference soil mass needs at least one core.");
  return cores.reduce(
    (smallest, core) => Math.min(smallest, cumulativeSocProfile(core).at(-1)!.cumulativeMassMgPerHa),
    Infinity,
  );
}

export type EsmInterpolation = "linear" | "cubic";

export interface EsmOptions {
  /** Linear (Ellert & Bettany 1995) or monotone piecewise cubic, Fritsch–Carlson (Wendt & Hauser 2013). */
  interpolation?: EsmInterpolation;
  /** Names the core in error messages, e.g. "Plot 203, 2026 fall". */
  coreLabel?: string;
}

/**
 * SOC stock on an equivalent-soil-mass basis, Mg C/ha: cumulative SOC interpolated at the reference
 * fine-earth mass, through (0, 0) and the cumulative (mass, SOC) points of the increments.
 * Linear: C = C_k + (M_ref − M_k)/(M_{k+1} − M_k) · (C_{k+1} − C_k) (Ellert & Bettany 1995).
 * Cubic: monotone piecewise-cubic Hermite (Fritsch & Carlson 1980, SIAM J. Numer. Anal. 17:238–246),
 * as recommended by Wendt & Hauser 2013 and von Haden, Yang & DeLucia 2020; needs ≥ 3 increments.
 * Throws when the reference mass lies beyond the core's deepest cumulative mass (no extrapolation).
 */
export function socStockEsmMgPerHa(
  increments: readonly CoreIncrement[],
  referenceMassMgPerHa: number,
  { interpolation = "linear", coreLabel = "This core" }: EsmOptions = {},
): number {
  requirePositive(referenceMassMgPerHa, "Reference soil mass (Mg/ha)", "referenceMassMgPerHa");
  const rows = cumulativeSocProfile(increments);
  requireMassInEveryIncrement(rows, coreLabel);
  const deepest = rows.at(-1)!;
  if (referenceMassMgPerHa > deepest.cumulativeMassMgPerHa) {
    throw new MeasurementError(
      `${coreLabel} reaches ${deepest.cumulativeMassMgPerHa.toFixed(1)} Mg/ha of fine earth at ${deepest.bottomCm} cm, ` +
        `less than the reference mass ${referenceMassMgPerHa.toFixed(1)} Mg/ha; the stock would need extrapolation. ` +
        "Use a smaller reference mass or sample deeper.",
      "referenceMassMgPerHa",
    );
  }
  const masses = [0, ...rows.map((r) => r.cumulativeMassMgPerHa)];
  const carbon = [0, ...rows.map((r) => r.cumulativeSocStockMgPerHa)];
  if (interpolation === "linear") return interpolateLinear(masses, carbon, referenceMassMgPerHa);
  if (rows.length < 3) {
    throw new MeasurementError(
      `${coreLabel} has ${rows.length} depth increment${rows.length === 1 ? "" : "s"}; ` +
        "the cubic equivalent-soil-mass method needs at least 3. Use linear interpolation.",
      "interpolation",
    );
  }
  return interpolateMonotoneCubic(masses, carbon, referenceMassMgPerHa);
}

/** Index k of the interval [x_k, x_{k+1}] holding x (x within [x_0, x_last], x strictly increasing). */
function intervalIndex(x: readonly number[], at: number): number {
  let k = 0;
  while (k < x.length - 2 && at > x[k + 1]) k++;
  return k;
}

/** Straight-line interpolation between the two knots around `at`. */
function interpolateLinear(x: readonly number[], y: readonly number[], at: number): number {
  const k = intervalIndex(x, at);
  return y[k] + ((at - x[k]) / (x[k + 1] - x[k])) * (y[k + 1] - y[k]);
}

/**
 * Fritsch–Carlson monotone cubic tangents (Fritsch & Carlson 1980, steps 1–5):
 * secants δ_k; three-point averages (δ_{k−1} + δ_k)/2 at interior knots, one-sided δ at the ends,
 * 0 where the secants change sign or one is 0; then, on each interval, if α² + β² > 9
 * (α = m_k/δ_k, β = m_{k+1}/δ_k), scale both tangents by τ = 3/√(α² + β²).
 */
export function fritschCarlsonTangents(x: readonly number[], y: readonly number[]): number[] {
  const n = x.length - 1;
  const secant = Array.from({ length: n }, (_, k) => (y[k + 1] - y[k]) / (x[k + 1] - x[k]));
  const m = new Array<number>(n + 1);
  m[0] = secant[0];
  m[n] = secant[n - 1];
  for (let k = 1; k < n; k++) {
    m[k] = secant[k - 1] * secant[k] > 0 ? (secant[k - 1] + secant[k]) / 2 : 0;
  }
  for (let k = 0; k < n; k++) {
    if (secant[k] === 0) {
      m[k] = 0;
      m[k + 1] = 0;
      continue;
    }
    const alpha = m[k] / secant[k];
    const beta = m[k + 1] / secant[k];
    const radius2 = alpha * alpha + beta * beta;
    if (radius2 > 9) {
      const tau = 3 / Math.sqrt(radius2);
      m[k] = tau * alpha * secant[k];
      m[k + 1] = tau * beta * secant[k];
    }
  }
  return m;
}

/** Cubic Hermite evaluation with Fritsch–Carlson tangents. */
function interpolateMonotoneCubic(x: readonly number[], y: readonly number[], at: number): number {
  const m = fritschCarlsonTangents(x, y);
  const k = intervalIndex(x, at);
  const h = x[k + 1] - x[k];
  const t = (at - x[k]) / h;
  const t2 = t * t;
  const t3 = t2 * t;
  return (
    (2 * t3 - 3 * t2 + 1) * y[k] +
    (t3 - 2 * t2 + t) * h * m[k] +
    (-2 * t3 + 3 * t2) * y[k + 1] +
    (t3 - t2) * h * m[k + 1]
  );
}
