import jStat from "jstat";

// jstat's studentized-range CDF integrates numerically and costs about half a millisecond per
// call — too slow for the thousands of Tukey pairs of a many-treatment, many-season trial. This
// module tabulates jstat's own values once per (nMeans, df) and interpolates between them; it
// computes no distribution of its own.

/** Spacing of the table in ln q: with fourth-order tangents the interpolation stays within 1e-6 of jstat (about 1e-7 for 24 means). */
export const STUDENTIZED_RANGE_STEP = 1 / 16;

/**
 * Below this lower-tail probability P(Q > q) is returned as 1. jstat's CDF drops from about 1e-13
 * to exactly 0 at a cut-off of its own, so nodes there cannot be interpolated; 1e-9 is far below
 * the stated tolerance.
 */
const NEGLIGIBLE_LOWER_TAIL = 1e-9;

/** Where F at the end of a coarse cell is at most COARSE_BELOW, the cell is read from every COARSE_STRIDE-th node. */
const COARSE_STRIDE = 4;
const COARSE_BELOW = 1e-3;

/** Tables kept before the cache starts over (each holds at most a few hundred numbers). */
const MAX_TABLES = 256;

/**
 * Somewhere jstat's node values can outlive the process — the command-line tool keeps them in
 * build/cli, so a run does not pay again for the nodes the previous run computed. A stored value
 * stands in for the one jstat call it came from, and a node is looked up only when the
 * interpolation asks for it, so every result is the same with or without a store.
 */
export interface StudentizedRangeNodeStore {
  /** jstat's CDF at the nodes kept for (nMeans, df), by node index (q = exp(index·h)); undefined when none. */
  load(nMeans: number, df: number): ReadonlyMap<number, number> | undefined;
  /** Keeps every node value known for (nMeans, df); called by `saveStudentizedRangeNodes`. */
  save(nMeans: number, df: number, cdfByNode: ReadonlyMap<number, number>): void;
}

/**
 * The cubic Hermite z(t) on one interval, t from 0 to 1: end values z0, z1 and tangents m0, m1 per
 * interval length. A table keeps null instead where an end node is one of jstat's cut-offs (jstat
 * is then called directly).
 */
interface HermiteSegment {
  z0: number;
  z1: number;
  m0: number;
  m1: number;
}

interface StudentizedRangeTable {
  nMeans: number;
  df: number;
  /** Node i sits at q = exp(i·h); value: jstat's CDF F there and its probit Φ⁻¹(F). */
  nodes: Map<number, { cdf: number; probit: number }>;
  /** Largest node known to have F ≤ NEGLIGIBLE_LOWER_TAIL. */
  negligibleBelow: number;
  /** See lowerTailBoundary; found when first needed. */
  lowerBoundary?: number;
  /** The cubic on each interval read so far, by its first node, for the fine and the coarse lattice. */
  fineSegments: Map<number, HermiteSegment | null>;
  coarseSegments: Map<number, HermiteSegment | null>;
  /** Node values from the store, read when the table was opened. */
  stored: ReadonlyMap<number, number> | undefined;
  /** Whether jstat was called for a node the store did not hold. */
  unsaved: boolean;
}

const tables = new Map<string, StudentizedRangeTable>();
/** The table used last, with the df it was asked for: pairs of one family come in a run. */
let last: { nMeans: number; dfExact: number; table: StudentizedRangeTable } | null = null;
let nodeStore: StudentizedRangeNodeStore | null = null;

/** Reads node values from `store` for tables opened from now on (null: none); see `saveStudentizedRangeNodes`. */
export function useStudentizedRangeNodeStore(store: StudentizedRangeNodeStore | null): void {
  nodeStore = store;
}

/** Hands every table that gained nodes from jstat to the store in use, with the nodes it already held. */
export function saveStudentizedRangeNodes(): void {
  if (!nodeStore) return;
  for (const table of tables.values()) {
    if (!table.unsaved) continue;
    const cdfByNode = new Map(table.stored);
    for (const [i, { cdf }] of table.nodes) cdfByNode.set(i, cdf);
    nodeStore.save(table.nMeans, table.df, cdfByNode);
    table.unsaved = false;
  }
}

/**
 * The table for (nMeans, df), df rounded to 6 decimals: Satterthwaite df that are equal in exact
 * arithmetic (114.99999999999999 and 115) share one table, and p moves far less than the tolerance.
 */
function tableFor(nMeans: number, dfExact: number): StudentizedRangeTable {
  if (last && last.nMeans === nMeans && last.dfExact === dfExact) return last.table;
  const df = Math.round(dfExact * 1e6) / 1e6;
  const key = `${nMeans}|${df}`;
  let table = tables.get(key);
  if (!table) {
    if (tables.size >= MAX_TABLES) tables.clear(); // `last` may keep one old table alive; harmless
    table = {
      nMeans,
      df,
      nodes: new Map(),
      negligibleBelow: Number.NEGATIVE_INFINITY,
      fineSegments: new Map(),
      coarseSegments: new Map(),
      stored: nodeStore?.load(nMeans, df),
      unsaved: false,
    };
    tables.set(key, table);
  }
  last = { nMeans, dfExact, table };
  return table;
}

function node(table: StudentizedRangeTable, i: number): { cdf: number; probit: number } {
  let found = table.nodes.get(i);
  if (found === undefined) {
    let cdf = table.stored?.get(i);
    if (cdf === undefined) {
      cdf = jStat.tukey.cdf(Math.exp(i * STUDENTIZED_RANGE_STEP), table.nMeans, table.df);
      table.unsaved = true;
    }
    found = { cdf, probit: cdf > 0 && cdf < 1 ? probitOfCdf(cdf) : Number.NaN };
    table.nodes.set(i, found);
    if (cdf <= NEGLIGIBLE_LOWER_TAIL && i > table.negligibleBelow) table.negligibleBelow = i;
  }
  return found;
}

/**
 * The largest coarse node (index a multiple of COARSE_STRIDE) with F ≤ NEGLIGIBLE_LOWER_TAIL,
 * found once per table by bisection, so that the many small q of near-equal means cost no node
 * each. F is increasing in q, so every q below it has P(Q > q) = 1 to within 1e-9.
 */
function lowerTailBoundary(table: StudentizedRangeTable): number {
  if (table.lowerBoundary !== undefined) return table.lowerBoundary;
  const negligible = (c: number) => node(table, c * COARSE_STRIDE).cdf <= NEGLIGIBLE_LOWER_TAIL;
  // Coarse indices lo (negligible) < hi (not): widen downwards, then bisect.
  let hi = 0;
  while (negligible(hi) && hi < 64) hi += 4;
  let lo = hi - 1;
  for (let step = 2; !negligible(lo); step *= 2) {
    hi = lo;
    lo -= step;
    if (lo < -4096) return (table.lowerBoundary = Number.NEGATIVE_INFINITY);
  }
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (negligible(mid)) lo = mid;
    else hi = mid;
  }
  return (table.lowerBoundary = lo * COARSE_STRIDE);
}

/** z = Φ⁻¹(F), computed from the smaller tail so that neither tail loses precision. */
function probitOfCdf(f: number): number {
  return f < 0.5 ? jStat.normal.inv(f, 0, 1) : -jStat.normal.inv(1 - f, 0, 1);
}

/** P(Q > q) straight from jstat: 1 − F(q; nMeans, df). */
export function studentizedRangeUpperPDirect(q: number, nMeans: number, df: number): number {
  return Math.min(1, Math.max(0, 1 - jStat.tukey.cdf(q, nMeans, df)));
}

/** Probits z at the six stencil nodes around an interval (its ends are z[2] and z[3]); reused by every call. */
const stencil = new Float64Array(6);

/**
 * Tangent at stencil point c (2 or 3) per unit of the stencil spacing (the interval has length 1
 * in these units): five points where all are usable, else three (next to jstat's cut-offs), else
 * the secant.
 */
function stencilTangent(z: Float64Array, c: number, secant: number): number {
  const fivePoint = (z[c - 2] - 8 * z[c - 1] + 8 * z[c + 1] - z[c + 2]) / 12;
  if (Number.isFinite(fivePoint)) return fivePoint;
  const threePoint = c === 2 ? (-3 * z[2] + 4 * z[3] - z[4]) / 2 : (3 * z[3] - 4 * z[2] + z[1]) / 2;
  const central = (z[c + 1] - z[c - 1]) / 2;
  return Number.isFinite(central) ? central : Number.isFinite(threePoint) ? threePoint : secant;
}

/** The monotone cubic between stencil points 2 and 3 (see studentizedRangeUpperPTabulated), or null next to a cut-off node. */
function hermiteSegment(z: Float64Array): HermiteSegment | null {
  if (Number.isNaN(z[2]) || Number.isNaN(z[3])) return null;
  const secant = z[3] - z[2];
  let m0 = stencilTangent(z, 2, secant);
  let m1 = stencilTangent(z, 3, secant);
  if (secant === 0) {
    m0 = 0;
    m1 = 0;
  } else {
    if (m0 * secant <= 0 || (z[2] - z[1]) * secant <= 0) m0 = 0;
    if (m1 * secant <= 0 || (z[4] - z[3]) * secant <= 0) m1 = 0;
    const alpha = m0 / secant;
    const beta = m1 / secant;
    const radius2 = alpha * alpha + beta * beta;
    if (radius2 > 9) {
      const tau = 3 / Math.sqrt(radius2);
      m0 *= tau;
      m1 *= tau;
    }
  }
  return { z0: z[2], z1: z[3], m0, m1 };
}

/**
 * P(Q > q) of the studentized range for nMeans means and df error degrees of freedom, read from
 * a table of jstat's CDF (jstat's port of R's ptukey; Copenhaver & Holland 1988, J. Stat. Comput.
 * Simul. 30:1–15) built lazily per (nMeans, df):
 * - nodes on a fixed lattice q_i = exp(i·h), h = 1/16, each one jstat call, computed when first
 *   needed and kept (or read from the `StudentizedRangeNodeStore` in use), so a value depends on
 *   (q, nMeans, df) and not on which pairs came before.
 *   In the lower tail (F ≤ 1e-3 at the end of a block of four nodes) every fourth node is used:
 *   there an error δz in z moves P by only φ(z)·δz ≤ 0.0034·δz.
 * - between nodes, a cubic Hermite in (ln q, z = Φ⁻¹(F)) — on that scale the CDF is nearly a
 *   straight line — with fourth-order five-point tangents (m_i = (z_{i−2} − 8z_{i−1} + 8z_{i+1} −
 *   z_{i+2})/12h), made monotone by the Fritsch–Carlson conditions (a tangent against the secant
 *   is set to 0; both are scaled by 3/√(α² + β²) when α² + β² > 9; Fritsch & Carlson 1980,
 *   SIAM J. Numer. Anal. 17:238–246), so p never increases with q;
 * - when F at the node above q is ≤ 1e-9 the answer is 1 (exact to 1e-9); next to a node that
 *   is exactly 0 or 1 (jstat's own cut-offs, where its CDF is not smooth) the tangents use fewer
 *   points, and when a node bounding q is such a node the direct jstat value is returned.
 * Agreement with direct jstat calls is checked in tests/unit/stats/studentized-range-table.test.ts.
 */
export function studentizedRangeUpperPTabulated(q: number, nMeans: number, df: number): number {
  if (Number.isNaN(q) || !(nMeans >= 2) || !(df > 0)) return Number.NaN;
  if (q <= 0) return 1;
  if (q === Number.POSITIVE_INFINITY) return 0;
  const table = tableFor(nMeans, df);
  const u = Math.log(q) / STUDENTIZED_RANGE_STEP;
  // Deep in the lower tail an error δz moves P by only φ(z)·δz, so every COARSE_STRIDE-th node
  // is enough there; which spacing applies depends only on a node value, not on earlier calls.
  const cell = Math.floor(u / COARSE_STRIDE);
  if (u < 0 && (cell + 1) * COARSE_STRIDE <= lowerTailBoundary(table)) return 1;
  const coarse = node(table, (cell + 1) * COARSE_STRIDE).cdf <= COARSE_BELOW;
  const stride = coarse ? COARSE_STRIDE : 1;
  const i = coarse ? cell * COARSE_STRIDE : Math.floor(u);
  // F(q) ≤ F(q_{i+stride}) ≤ 1e-9: the upper tail is 1 to within 1e-9.
  if (i + stride <= table.negligibleBelow) return 1;
  // A segment is made from node values only, so one kept from an earlier call is the one this call would make.
  const segments = coarse ? table.coarseSegments : table.fineSegments;
  let segment = segments.get(i);
  if (segment === undefined) {
    const z = stencil;
    for (let d = -2; d <= 3; d++) z[d + 2] = node(table, i + d * stride).probit;
    if (i + stride <= table.negligibleBelow) return 1;
    segment = hermiteSegment(z);
    segments.set(i, segment);
  }
  if (segment === null) return studentizedRangeUpperPDirect(q, nMeans, df);
  const { z0, z1, m0, m1 } = segment;
  const t = (u - i) / stride;
  const t2 = t * t;
  const t3 = t2 * t;
  const zq = (2 * t3 - 3 * t2 + 1) * z0 + (t3 - 2 * t2 + t) * m0 + (-2 * t3 + 3 * t2) * z1 + (t3 - t2) * m1;
  // P(Q > q) = 1 − Φ(z) = Φ(−z), from the upper tail directly.
  return Math.min(1, Math.max(0, jStat.normal.cdf(-zq, 0, 1)));
}

/**
 * Quantile q(p; nMeans, df) of the studentized range from the same table: the q with
 * P(Q > q) = 1 − p, found by walking the lattice to the two nodes that bracket it and bisecting
 * the monotone interpolant between them (to 1e-13 in ln q). Inverting the table the p-values
 * come from keeps Tukey CIs and adjusted p-values in agreement (a difference equal to the HSD
 * has p = α); jstat's tukey.inv itself stops at a tolerance of 1e-4 in q and is the fallback.
 */
export function studentizedRangeQuantileTabulated(p: number, nMeans: number, df: number): number {
  if (!(p > 0 && p < 1) || !(nMeans >= 2) || !(df > 0)) return Number.NaN;
  const target = 1 - p;
  const table = tableFor(nMeans, df);
  const upperAtNode = (i: number) => 1 - node(table, i).cdf;
  let i = Math.round(Math.log(3.5) / STUDENTIZED_RANGE_STEP);
  for (let steps = 0; upperAtNode(i) < target; steps++, i--) if (steps > 400) return jStat.tukey.inv(p, nMeans, df);
  for (let steps = 0; upperAtNode(i + 1) >= target; steps++, i++) if (steps > 400) return jStat.tukey.inv(p, nMeans, df);
  let lo = i * STUDENTIZED_RANGE_STEP;
  let hi = (i + 1) * STUDENTIZED_RANGE_STEP;
  while (hi - lo > 1e-13) {
    const mid = (lo + hi) / 2;
    if (studentizedRangeUpperPTabulated(Math.exp(mid), nMeans, df) >= target) lo = mid;
    else hi = mid;
  }
  return Math.exp((lo + hi) / 2);
}
