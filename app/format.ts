// One formatter per number of decimals: toLocaleString with options builds a new one on every call,
// which a results page with hundreds of numbers pays for on every render.
const formatters = new Map<number, Intl.NumberFormat>();

/** Numbers for people: fixed decimals, a real minus sign, "—" for a missing value. Shown with the `num` class. */
export function formatNumber(value: number | null | undefined, digits = 1): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  let formatter = formatters.get(digits);
  if (!formatter) {
    formatter = new Intl.NumberFormat("en-US", { minimumFractionDigits: digits, maximumFractionDigits: digits });
    formatters.set(digits, formatter);
  }
  const text = formatter.format(value);
  return text.startsWith("-") ? `−${text.slice(1)}` : text;
}

/** A p-value as journals print it: three decimals, or "< 0.001". */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  return p < 0.001 ? "< 0.001" : p.toFixed(3);
}

/** A statistic with about `significant` significant digits but never more than 4 decimals (SS, MS, F). */
export function formatStatistic(value: number | null | undefined, significant = 5): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  const magnitude = value === 0 ? 0 : Math.floor(Math.log10(Math.abs(value)));
  const digits = Math.min(4, Math.max(0, significant - 1 - magnitude));
  return formatNumber(value, digits);
}

/** Degrees of freedom: whole numbers as such, Satterthwaite or ε-corrected ones to one decimal. */
export function formatDf(df: number | null | undefined): string {
  if (df === null || df === undefined || !Number.isFinite(df)) return "—";
  return Number.isInteger(df) ? String(df) : formatNumber(df, 1);
}
