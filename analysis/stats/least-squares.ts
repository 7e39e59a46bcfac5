import { Matrix, QrDecomposition, inverse } from "ml-matrix";

export interface LeastSquaresFit {
  /** Coefficient of every column; NaN for a column aliased with earlier ones. */
  coefficients: number[];
  aliased: boolean[];
  /** Rank of X (number of estimable coefficients). */
  rank: number;
  /** Residual sum of squares ‖y − Xb‖². */
  rss: number;
  fitted: number[];
  residuals: number[];
  /** Diagonal of the hat matrix H = X(X'X)⁻X', h_ii = Σ_j Q_ij² for the thin Q. */
  leverage: number[];
  /** (X'X)⁻¹ over the estimable columns; rows and columns of aliased ones are NaN. */
  unscaledCovariance: number[][];
}

/** Relative size of |R_jj| below which column j is taken as a linear combination of earlier ones. */
const ALIAS_TOLERANCE = 1e-9;

function selectColumns(rows: readonly number[][], keep: readonly number[]): Matrix {
  return new Matrix(rows.map((row) => keep.map((j) => row[j])));
}

/**
 * Householder QR of the kept columns (ml-matrix), dropping columns whose R_jj is negligible
 * against their norm — the columns R's lm() would report as aliased — until X is of full rank.
 */
function fullRankQr(rows: readonly number[][], columnCount: number) {
  let keep = Array.from({ length: columnCount }, (_, j) => j);
  for (;;) {
    const x = selectColumns(rows, keep);
    const qr = new QrDecomposition(x);
    const r = qr.upperTriangularMatrix;
    const dependent = new Set<number>();
    keep.forEach((_, j) => {
      const norm = x.getColumnVector(j).norm();
      if (norm === 0 || Math.abs(r.get(j, j)) <= ALIAS_TOLERANCE * norm) dependent.add(j);
    });
    if (dependent.size === 0) return { keep, x, qr, r };
    keep = keep.filter((_, j) => !dependent.has(j));
  }
}

/**
 * Ordinary least squares b = argmin ‖y − Xb‖² by the QR decomposition X = QR, b = R⁻¹Q'y
 * (Golub & Van Loan, Matrix Computations, §5.3), with aliased columns set aside.
 */
export function leastSquares(rows: readonly number[][], y: readonly number[]): LeastSquaresFit {
  const n = rows.length;
  const columnCount = rows[0]?.length ?? 0;
  if (n === 0 || columnCount === 0) throw new Error("a linear model needs at least one observation and one column");
  const { keep, x, qr, r } = fullRankQr(rows, columnCount);
  const b = qr.solve(Matrix.columnVector([...y])).to1DArray();
  const fitted = x.mmul(Matrix.columnVector(b)).to1DArray();
  const residuals = y.map((v, i) => v - fitted[i]);
  const q = qr.orthogonalMatrix;
  const leverage = Array.from({ length: n }, (_, i) => q.getRow(i).reduce((s, v) => s + v * v, 0));
  const rInverse = inverse(r);
  const covKept = rInverse.mmul(rInverse.transpose());

  const coefficients = new Array<number>(columnCount).fill(Number.NaN);
  const aliased = new Array<boolean>(columnCount).fill(true);
  const unscaledCovariance = Array.from({ length: columnCount }, () => new Array<number>(columnCount).fill(Number.NaN));
  keep.forEach((col, a) => {
    coefficients[col] = b[a];
    aliased[col] = false;
    keep.forEach((col2, c) => {
      unscaledCovariance[col][col2] = covKept.get(a, c);
    });
  });
  return {
    coefficients,
    aliased,
    rank: keep.length,
    rss: residuals.reduce((s, e) => s + e * e, 0),
    fitted,
    residuals,
    leverage,
    unscaledCovariance,
  };
}

/**
 * Residual sum of squares and rank of the least-squares fit on a subset of columns —
 * the building block of model comparisons (extra sums of squares).
 */
export function residualSumOfSquares(
  rows: readonly number[][],
  y: readonly number[],
  columns: readonly number[],
): { rss: number; rank: number } {
  const sub = rows.map((row) => columns.map((j) => row[j]));
  const { keep, qr, x } = fullRankQr(sub, columns.length);
  const b = qr.solve(Matrix.columnVector([...y])).to1DArray();
  const fitted = x.mmul(Matrix.columnVector(b)).to1DArray();
  return { rss: y.reduce((s, v, i) => s + (v - fitted[i]) ** 2, 0), rank: keep.length };
}
