/**
 * A measurement that cannot be used, with a sentence saying what is wrong and how to fix it.
 * `field` names the input property at fault, so lab intake can point at the column in the file.
 */
export class MeasurementError extends Error {
  readonly field: string | undefined;

  constructor(message: string, field?: string) {
    super(message);
    this.name = "MeasurementError";
    this.field = field;
  }
}

/** Throws unless `value` is a finite number; the message names the quantity in words. */
export function requireFinite(value: number, what: string, field?: string): void {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new MeasurementError(`${what} must be a number (got ${String(value)}).`, field);
  }
}

/** Throws unless `value` is a finite number greater than 0. */
export function requirePositive(value: number, what: string, field?: string): void {
  requireFinite(value, what, field);
  if (value <= 0) throw new MeasurementError(`${what} must be more than 0 (got ${value}).`, field);
}

/** Throws unless `value` is a finite number of 0 or more. */
export function requireNonNegative(value: number, what: string, field?: string): void {
  requireFinite(value, what, field);
  if (value < 0) throw new MeasurementError(`${what} cannot be negative (got ${value}).`, field);
}

/** How plausible a value is: ok, a warning the user confirms, or an error that blocks it. */
export type PlausibilityFlag =
  { status: "ok" } | { status: "warning"; message: string } | { status: "error"; message: string };
