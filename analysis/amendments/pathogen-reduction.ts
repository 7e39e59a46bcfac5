import { MeasurementError } from "../soil/errors";

/** One row of a compost temperature log. */
export interface TemperatureReading {
  /** Local date-time as logged, ISO 8601 ("2025-06-01T08:30" or "2025-06-01"); the day is its date part. */
  takenAt: string;
  /** Probe reading, °C; null for a row that records only a turning. */
  temperatureC: number | null;
  /** True when the pile was turned at this time. */
  turned?: boolean;
}

export type CompostingMethod = "turned_windrow" | "static_pile" | "in_vessel";

/** Pathogen-reduction temperature, °C (131 °F): 21 CFR 112.54; 40 CFR 503 Appendix B. */
export const PATHOGEN_REDUCTION_MIN_C = 55;

interface Rule {
  text: string;
  citation: string;
}

export const PATHOGEN_REDUCTION_RULES: Record<"turned_windrow" | "static", Rule> = {
  turned_windrow: {
    text:
      "Turned windrow: at least 15 days, not necessarily consecutive, on which every reading is at or above " +
      "55 °C (131 °F), with at least 5 turnings during that period, followed by curing.",
    citation:
      "US FDA 21 CFR 112.54 (turned composting, for composts containing manure); " +
      "US EPA 40 CFR Part 503, Appendix B (composting, windrow method, for biosolids)",
  },
  static: {
    text:
      "Static pile or in-vessel: at least 3 consecutive days on which every reading is at or above 55 °C (131 °F), " +
      "followed by curing.",
    citation:
      "US FDA 21 CFR 112.54 (static composting, for composts containing manure); " +
      "US EPA 40 CFR Part 503, Appendix B (composting, within-vessel or static aerated pile method, for biosolids)",
  },
};

export const PATHOGEN_REDUCTION_CAUTION =
  "A pass here is an indication from the temperature log, not regulatory compliance. The log cannot show that " +
  "the pile stayed aerobic, that probes covered the whole pile, or that the compost was cured, and it replaces no " +
  "microbial test. Follow the regulation that applies to you and your regulator's or institution's guidance.";

const REQUIRED_WINDROW_DAYS = 15;
const REQUIRED_TURNINGS = 5;
const REQUIRED_STATIC_CONSECUTIVE_DAYS = 3;

export interface LogDay {
  /** YYYY-MM-DD */
  date: string;
  readings: number;
  minimumC: number | null;
  maximumC: number | null;
  turnings: number;
  /** Every reading that day was ≥ 55 °C (a day with no readings does not count). */
  counts: boolean;
}

export interface PathogenReductionCheck {
  method: CompostingMethod;
  passed: boolean;
  /** The rule applied, in words. */
  rule: string;
  /** The regulations the rule comes from. */
  citation: string;
  /** One sentence: why it passed or failed. */
  summary: string;
  caution: string;
  /** Every logged day, in date order. */
  days: LogDay[];
  /** Dates of the days that count (all of them, in date order). */
  qualifyingDates: string[];
  /** Windrow: turnings from the first to the last qualifying day, inclusive. Null for static methods. */
  turningsDuringPeriod: number | null;
  /** Static: the longest run of consecutive qualifying days. Null for windrows. */
  longestConsecutiveRun: string[] | null;
}

const DATE_PREFIX = /^(\d{4})-(\d{2})-(\d{2})/;

/** Days since 1970-01-01 for the date at the start of `takenAt`, or null when it is not a real calendar date. */
function calendarDayNumber(takenAt: string): number | null {
  const match = DATE_PREFIX.exec(takenAt);
  if (!match) return null;
  const [y, m, d] = [Number(match[1]), Number(match[2]), Number(match[3])];
  const ms = Date.UTC(y, m - 1, d);
  const check = new Date(ms);
  const real = check.getUTCFullYear() === y && check.getUTCMonth() === m - 1 && check.getUTCDate() === d;
  return real ? ms / 86_400_000 : null;
}

/** Groups the log by calendar day and marks the days that count (every reading ≥ 55 °C). */
export function summarizeTemperatureLog(readings: readonly TemperatureReading[]): LogDay[] {
  const byDay = new Map<number, { date: string; temps: number[]; turnings: number }>();
  readings.forEach((r, i) => {
    const row = i + 1;
    const n = calendarDayNumber(r.takenAt);
    if (n === null) {
      throw new MeasurementError(
        `Row ${row}: "${r.takenAt}" is not a date; write it as YYYY-MM-DD or YYYY-MM-DDThh:mm.`,
        "takenAt",
      );
    }
    if (r.temperatureC !== null && !Number.isFinite(r.temperatureC)) {
      throw new MeasurementError(`Row ${row}: the probe reading must be a number in °C.`, "temperatureC");
    }
    const day = byDay.get(n) ?? { date: r.takenAt.slice(0, 10), temps: [], turnings: 0 };
    if (r.temperatureC !== null) day.temps.push(r.temperatureC);
    if (r.turned) day.turnings += 1;
    byDay.set(n, day);
  });
  return [...byDay.entries()]
    .sort(([a], [b]) => a - b)
    .map(([, d]) => ({
      date: d.date,
      readings: d.temps.length,
      minimumC: d.temps.length ? Math.min(...d.temps) : null,
      maximumC: d.temps.length ? Math.max(...d.temps) : null,
      turnings: d.turnings,
      counts: d.temps.length > 0 && d.temps.every((t) => t >= PATHOGEN_REDUCTION_MIN_C),
    }));
}

/** Longest run of qualifying days on consecutive calendar dates (a missing date breaks the run). */
function longestConsecutiveRun(days: readonly LogDay[]): string[] {
  let best: string[] = [];
  let run: string[] = [];
  let previous = NaN;
  for (const d of days) {
    const n = calendarDayNumber(d.date)!;
    if (!d.counts) {
      run = [];
    } else {
      run = n === previous + 1 && run.length > 0 ? [...run, d.date] : [d.date];
      if (run.length > best.length) best = run;
    }
    previous = n;
  }
  return best;
}

/**
 * Pathogen-reduction check from a compost temperature log.
 * A day counts when every reading that day is ≥ 55 °C.
 * Turned windrow: ≥ 15 counting days (not necessarily consecutive) and ≥ 5 turnings during the period
 * at temperature, taken here as the first to the last counting day inclusive (40 CFR 503 App. B:
 * "during the period when the compost is maintained at 55 degrees or higher").
 * Static pile / in-vessel: ≥ 3 counting days on consecutive dates.
 * Sources: US FDA 21 CFR 112.54; US EPA 40 CFR Part 503, Appendix B. An indication, not compliance.
 */
export function checkPathogenReduction(
  readings: readonly TemperatureReading[],
  method: CompostingMethod,
): PathogenReductionCheck {
  if (readings.length === 0) throw new MeasurementError("The temperature log is empty.");
  const days = summarizeTemperatureLog(readings);
  const qualifying = days.filter((d) => d.counts);
  const qualifyingDates = qualifying.map((d) => d.date);
  const base = { method, caution: PATHOGEN_REDUCTION_CAUTION, days, qualifyingDates };

  if (method === "turned_windrow") {
    const rule = PATHOGEN_REDUCTION_RULES.turned_windrow;
    const first = qualifyingDates[0];
    const last = qualifyingDates.at(-1);
    const turnings = days
      .filter((d) => first !== undefined && d.date >= first && d.date <= last!)
      .reduce((sum, d) => sum + d.turnings, 0);
    const enoughDays = qualifying.length >= REQUIRED_WINDROW_DAYS;
    const enoughTurnings = turnings >= REQUIRED_TURNINGS;
    const passed = enoughDays && enoughTurnings;
    const summary =
      `${qualifying.length} of the required ${REQUIRED_WINDROW_DAYS} days at or above 55 °C; ` +
      `${turnings} of the required ${REQUIRED_TURNINGS} turnings during that period — ` +
      (passed ? "the log meets the rule." : "the log does not meet the rule.");
    return {
      ...base,
      passed,
      rule: rule.text,
      citation: rule.citation,
      summary,
      turningsDuringPeriod: turnings,
      longestConsecutiveRun: null,
    };
  }

  const rule = PATHOGEN_REDUCTION_RULES.static;
  const run = longestConsecutiveRun(days);
  const passed = run.length >= REQUIRED_STATIC_CONSECUTIVE_DAYS;
  const summary =
    `Longest run of consecutive days at or above 55 °C: ${run.length} (required ${REQUIRED_STATIC_CONSECUTIVE_DAYS}) — ` +
    (passed ? "the log meets the rule." : "the log does not meet the rule.");
  return {
    ...base,
    passed,
    rule: rule.text,
    citation: rule.citation,
    summary,
    turningsDuringPeriod: null,
    longestConsecutiveRun: run,
  };
}
