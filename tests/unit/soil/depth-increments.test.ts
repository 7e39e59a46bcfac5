import { describe, expect, it } from "vitest";
import { contiguousDepthIncrements, depthIncrementProblems } from "../../../analysis/soil";

// Rule from DESIGN.md / issue 4: increments contiguous from 0 cm, no gaps or overlaps.
describe("depth increments", () => {
  it("accepts 0–10, 10–20, 20–30 cm in any order and returns them top down", () => {
    const input = [
      { topCm: 20, bottomCm: 30 },
      { topCm: 0, bottomCm: 10 },
      { topCm: 10, bottomCm: 20 },
    ];
    expect(depthIncrementProblems(input)).toEqual([]);
    expect(contiguousDepthIncrements(input).map((d) => d.topCm)).toEqual([0, 10, 20]);
  });

  it("accepts uneven thicknesses", () => {
    expect(
      depthIncrementProblems([
        { topCm: 0, bottomCm: 5 },
        { topCm: 5, bottomCm: 15 },
        { topCm: 15, bottomCm: 45 },
      ]),
    ).toEqual([]);
  });

  it("reports a gap", () => {
    const problems = depthIncrementProblems([
      { topCm: 0, bottomCm: 10 },
      { topCm: 15, bottomCm: 30 },
    ]);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/Gap between 0–10 cm and 15–30 cm/);
  });

  it("reports an overlap, including a duplicated increment", () => {
    expect(
      depthIncrementProblems([
        { topCm: 0, bottomCm: 10 },
        { topCm: 5, bottomCm: 20 },
      ])[0],
    ).toMatch(/overlap/);
    expect(
      depthIncrementProblems([
        { topCm: 0, bottomCm: 10 },
        { topCm: 0, bottomCm: 10 },
      ])[0],
    ).toMatch(/overlap/);
  });

  it("reports a profile that does not start at the surface", () => {
    expect(depthIncrementProblems([{ topCm: 5, bottomCm: 10 }])[0]).toMatch(/must start at the surface/);
  });

  it("reports upside-down, negative and empty increments", () => {
    expect(depthIncrementProblems([{ topCm: 10, bottomCm: 0 }])[0]).toMatch(/bottom deeper than its top/);
    expect(depthIncrementProblems([{ topCm: -5, bottomCm: 10 }])[0]).toMatch(/above the soil surface/);
    expect(depthIncrementProblems([])[0]).toMatch(/at least one depth increment/);
  });

  it("throws all problems at once when asked for contiguous increments", () => {
    expect(() =>
      contiguousDepthIncrements([
        { topCm: 5, bottomCm: 10 },
        { topCm: 12, bottomCm: 20 },
      ]),
    ).toThrow(/start at the surface.*Gap between/s);
  });
});
