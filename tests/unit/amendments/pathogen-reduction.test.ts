import { describe, expect, it } from "vitest";
import { checkPathogenReduction, summarizeTemperatureLog, type TemperatureReading } from "../../../analysis/amendments";

// Rules from DESIGN.md, after US FDA 21 CFR 112.54 and US EPA 40 CFR Part 503 Appendix B:
// a day counts when every reading that day is ≥ 55 °C;
// turned windrow: ≥ 15 such days (not necessarily consecutive) and ≥ 5 turnings;
// static / in-vessel: ≥ 3 consecutive such days.

/** ISO date `offset` days after 2025-06-01. */
function day(offset: number): string {
  return new Date(Date.UTC(2025, 5, 1 + offset)).toISOString().slice(0, 10);
}

/** Two readings a day (08:00 and 16:00) at the given temperatures. */
function log(days: { offset: number; am: number; pm: number; turned?: boolean }[]): TemperatureReading[] {
  return days.flatMap((d) => [
    { takenAt: `${day(d.offset)}T08:00`, temperatureC: d.am, turned: d.turned ?? false },
    { takenAt: `${day(d.offset)}T16:00`, temperatureC: d.pm },
  ]);
}

/** A windrow log: `hot` days at 58–63 °C over days 0…, skipping every 4th day (a cool 50 °C day), turned on the listed hot days. */
function windrowLog(hot: number, turnedOnHotDays: number[]): TemperatureReading[] {
  const days: { offset: number; am: number; pm: number; turned?: boolean }[] = [];
  let offset = 0;
  let hotCount = 0;
  while (hotCount < hot) {
    if (offset % 4 === 3) {
      days.push({ offset, am: 50, pm: 52 });
    } else {
      days.push({ offset, am: 58, pm: 63, turned: turnedOnHotDays.includes(hotCount) });
      hotCount++;
    }
    offset++;
  }
  return log(days);
}

describe("summarizeTemperatureLog", () => {
  it("a day counts only when every reading is at least 55 °C", () => {
    const days = summarizeTemperatureLog([
      { takenAt: "2025-06-01T08:00", temperatureC: 55 },
      { takenAt: "2025-06-01T16:00", temperatureC: 61 },
      { takenAt: "2025-06-02T08:00", temperatureC: 60 },
      { takenAt: "2025-06-02T16:00", temperatureC: 54.9 },
      { takenAt: "2025-06-03T09:00", temperatureC: null, turned: true },
    ]);
    expect(days.map((d) => [d.date, d.counts])).toEqual([
      ["2025-06-01", true], // 55.0 is "at or above"
      ["2025-06-02", false], // one reading at 54.9 spoils the day
      ["2025-06-03", false], // a turning row alone is no evidence of temperature
    ]);
    expect(days[0]).toMatchObject({ readings: 2, minimumC: 55, maximumC: 61 });
    expect(days[2]).toMatchObject({ readings: 0, turnings: 1, minimumC: null });
  });

  it("orders days by date whatever the row order", () => {
    const days = summarizeTemperatureLog([
      { takenAt: "2025-06-10", temperatureC: 60 },
      { takenAt: "2025-05-31T23:59", temperatureC: 60 },
    ]);
    expect(days.map((d) => d.date)).toEqual(["2025-05-31", "2025-06-10"]);
  });

  it("refuses impossible dates and non-numeric readings, naming the row", () => {
    expect(() => summarizeTemperatureLog([{ takenAt: "2025-02-30T08:00", temperatureC: 60 }])).toThrow(
      /Row 1: "2025-02-30T08:00" is not a date/,
    );
    expect(() => summarizeTemperatureLog([{ takenAt: "01/06/2025", temperatureC: 60 }])).toThrow(/not a date/);
    expect(() =>
      summarizeTemperatureLog([
        { takenAt: "2025-06-01", temperatureC: 60 },
        { takenAt: "2025-06-02", temperatureC: Number.NaN },
      ]),
    ).toThrow(/Row 2: the probe reading must be a number/);
  });
});

describe("checkPathogenReduction — turned windrow", () => {
  it("passes with 15 non-consecutive qualifying days and 5 turnings", () => {
    const result = checkPathogenReduction(windrowLog(15, [0, 3, 6, 9, 12]), "turned_windrow");
    expect(result.passed).toBe(true);
    expect(result.qualifyingDates).toHaveLength(15);
    expect(result.turningsDuringPeriod).toBe(5);
    // the qualifying days are not consecutive (a cool day every fourth day)
    expect(result.days.some((d) => !d.counts)).toBe(true);
  });

  it("fails by one day: 14 qualifying days", () => {
    const result = checkPathogenReduction(windrowLog(14, [0, 3, 6, 9, 12]), "turned_windrow");
    expect(result.passed).toBe(false);
    expect(result.summary).toMatch(/^14 of the required 15 days/);
  });

  it("fails by one turning: 4 turnings", () => {
    const result = checkPathogenReduction(windrowLog(15, [0, 3, 6, 9]), "turned_windrow");
    expect(result.passed).toBe(false);
    expect(result.turningsDuringPeriod).toBe(4);
    expect(result.summary).toMatch(/4 of the required 5 turnings/);
  });

  it("does not count turnings before the pile reached temperature", () => {
    // 40 CFR 503 App. B: turnings "during the period when the compost is maintained at 55 degrees or higher"
    const early = log([
      { offset: 0, am: 30, pm: 35, turned: true },
      { offset: 1, am: 40, pm: 45, turned: true },
    ]);
    const later = windrowLog(15, [0, 3, 6]).map((r) => ({ ...r, takenAt: r.takenAt.replace("2025-06", "2025-07") }));
    const result = checkPathogenReduction([...early, ...later], "turned_windrow");
    expect(result.turningsDuringPeriod).toBe(3);
    expect(result.passed).toBe(false);
  });

  it("states the rule, the regulations and the caution", () => {
    const result = checkPathogenReduction(windrowLog(15, [0, 3, 6, 9, 12]), "turned_windrow");
    expect(result.rule).toMatch(/15 days, not necessarily consecutive.*55 °C.*5 turnings/);
    expect(result.citation).toMatch(/21 CFR 112\.54/);
    expect(result.citation).toMatch(/40 CFR Part 503, Appendix B/);
    // DESIGN.md: a pass is an indication, not regulatory compliance
    expect(result.caution).toMatch(/indication .* not regulatory compliance/);
    expect(result.longestConsecutiveRun).toBeNull();
  });
});

describe("checkPathogenReduction — static pile and in-vessel", () => {
  it("passes with 3 consecutive qualifying days", () => {
    const readings = log([
      { offset: 0, am: 45, pm: 52 },
      { offset: 1, am: 56, pm: 60 },
      { offset: 2, am: 58, pm: 62 },
      { offset: 3, am: 57, pm: 59 },
      { offset: 4, am: 50, pm: 48 },
    ]);
    const result = checkPathogenReduction(readings, "static_pile");
    expect(result.passed).toBe(true);
    expect(result.longestConsecutiveRun).toEqual([day(1), day(2), day(3)]);
    expect(result.citation).toMatch(/21 CFR 112\.54 \(static composting/);
    expect(result.citation).toMatch(/within-vessel or static aerated pile/);
    expect(result.turningsDuringPeriod).toBeNull();
    expect(checkPathogenReduction(readings, "in_vessel").passed).toBe(true);
  });

  it("fails by one day: 3 qualifying days that are not consecutive", () => {
    const readings = log([
      { offset: 0, am: 56, pm: 60 },
      { offset: 1, am: 58, pm: 62 },
      { offset: 2, am: 58, pm: 54 }, // one reading below 55 °C breaks the run
      { offset: 3, am: 57, pm: 59 },
    ]);
    const result = checkPathogenReduction(readings, "static_pile");
    expect(result.qualifyingDates).toHaveLength(3);
    expect(result.passed).toBe(false);
    expect(result.longestConsecutiveRun).toHaveLength(2);
    expect(result.summary).toMatch(/Longest run of consecutive days at or above 55 °C: 2 \(required 3\)/);
  });

  it("a day with no log breaks the run", () => {
    const readings = log([
      { offset: 0, am: 56, pm: 60 },
      { offset: 1, am: 58, pm: 62 },
      { offset: 3, am: 57, pm: 59 },
    ]);
    expect(checkPathogenReduction(readings, "in_vessel").passed).toBe(false);
  });

  it("refuses an empty log", () => {
    expect(() => checkPathogenReduction([], "static_pile")).toThrow(/empty/);
  });
});
