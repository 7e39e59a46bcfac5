// Reading a compost probe log CSV before anything is stored.
import { describe, expect, it } from "vitest";
import { parseLogDateTime, parseTemperatureCsv } from "~/.server/design/temperature-log";

describe("parseLogDateTime", () => {
  it("reads date-times with a space or a T, and bare dates", () => {
    expect(parseLogDateTime("2025-06-01 08:30")?.toISOString()).toBe("2025-06-01T08:30:00.000Z");
    expect(parseLogDateTime("2025-06-01T17:05:30")?.toISOString()).toBe("2025-06-01T17:05:30.000Z");
    expect(parseLogDateTime("2025-06-01")?.toISOString()).toBe("2025-06-01T00:00:00.000Z");
  });

  it("rejects dates that do not exist and other shapes", () => {
    expect(parseLogDateTime("2025-02-30 08:00")).toBeNull();
    expect(parseLogDateTime("01/06/2025")).toBeNull();
    expect(parseLogDateTime("")).toBeNull();
  });
});

describe("parseTemperatureCsv", () => {
  it("reads read_at, probe_c and turned", () => {
    const { rows, problems } = parseTemperatureCsv("read_at,probe_c,turned\n2025-06-01 08:00,57.5,no\n2025-06-01 16:00,58,yes\n");
    expect(problems).toEqual([]);
    expect(rows).toEqual([
      { readAt: "2025-06-01T08:00:00.000Z", probeC: 57.5, turned: false },
      { readAt: "2025-06-01T16:00:00.000Z", probeC: 58, turned: true },
    ]);
  });

  it("reports every bad line by number and keeps none of them", () => {
    const { problems } = parseTemperatureCsv("read_at,probe_c,turned\n2025-06-01 08:00,hot,no\n2025-13-01,56,maybe\n");
    expect(problems).toEqual([
      "Line 2: the probe reading “hot” is not a number of °C.",
      "Line 3: “2025-13-01” is not a date-time; write 2025-06-01 08:30.",
      "Line 3: “turned” must be yes or no (got “maybe”).",
    ]);
  });

  it("names the missing columns", () => {
    const { problems } = parseTemperatureCsv("when,reading\n2025-06-01,55\n");
    expect(problems[0]).toContain("No date-time column");
    expect(problems[1]).toContain("No temperature column");
  });
});
