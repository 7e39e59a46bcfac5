// Numbers for people: the formatter kept per number of decimals gives what toLocaleString gave.
import { expect, it } from "vitest";
import { formatNumber, formatStatistic } from "~/format";

it("formats with fixed decimals, grouping, a real minus sign and a dash for missing values", () => {
  expect(formatNumber(2.9)).toBe("2.9");
  expect(formatNumber(1234.5678, 2)).toBe("1,234.57");
  expect(formatNumber(-0.25, 3)).toBe("−0.250");
  expect(formatNumber(7, 0)).toBe("7");
  // The same number of decimals again, after other ones: each keeps its own formatter.
  expect(formatNumber(1234.5678, 2)).toBe("1,234.57");
  expect(formatNumber(null)).toBe("—");
  expect(formatNumber(Number.NaN, 2)).toBe("—");
  expect(formatStatistic(12.3456)).toBe("12.346"); // five significant digits
});
