// The plot map's geometry and how layouts are placed on the field grid.
import { describe, expect, it } from "vitest";
import { rcbdLayout, splitPlotLayout } from "../../../analysis/design";
import { drawLayout, fieldCell, layoutDesignOf, orderedFactors } from "~/.server/design/draw";
import { DesignError } from "~/.server/design/errors";
import { compassPoint, fieldGeometry, mapAxes, orientationText, styleIndexByCode, treatmentStyle, TREATMENT_FILLS, type PlotMapData } from "~/design/plot-map";

function mapData(orientation: "rows" | "columns"): Pick<PlotMapData, "trial" | "plots"> {
  const layout = rcbdLayout({ treatments: ["T1", "T2", "T3", "T4", "T5", "T6"], blocks: 4, seed: 20250314 });
  return {
    trial: {
      id: "t",
      title: "t",
      status: "draft",
      design: "rcbd",
      seed: 20250314,
      arrangement: "straight",
      blockOrientation: orientation,
      mapBearingDeg: 0,
      plotLengthM: 6,
      plotWidthM: 3,
      alleyBetweenPlotsM: 1,
      alleyBetweenBlocksM: 2,
      lockedAt: null,
      siteName: null,
    },
    plots: layout.plots.map((p) => ({
      plotNumber: p.plotNumber,
      block: p.block!,
      position: p.position,
      mainPlot: null,
      treatment: p.treatment,
      ...fieldCell(p, orientation),
    })),
  };
}

describe("fieldGeometry", () => {
  it("draws the demo's 6 × 4 RCBD to scale with blocks as rows", () => {
    const geo = fieldGeometry(mapData("rows"));
    // Hand calculation: 6 plots × 3 m + 5 alleys × 1 m = 23 m east–west;
    // 4 blocks × 6 m + 3 alleys × 2 m = 30 m north–south.
    expect(geo.widthM).toBe(23);
    expect(geo.heightM).toBe(30);
    const p406 = geo.plots.find((p) => p.plotNumber === 406)!;
    // Block 4 is the fourth row: y = 3 × (6 + 2) = 24 m; position 6 is x = 5 × (3 + 1) = 20 m.
    expect([p406.xM, p406.yM, p406.widthM, p406.heightM]).toEqual([20, 24, 3, 6]);
  });

  it("turns the field a quarter when blocks are columns", () => {
    const geo = fieldGeometry(mapData("columns"));
    // Hand calculation: 4 blocks × 6 m + 3 alleys × 2 m = 30 m east–west; 6 × 3 m + 5 × 1 m = 23 m north–south.
    expect(geo.widthM).toBe(30);
    expect(geo.heightM).toBe(23);
  });

  it("never overlaps two plots", () => {
    const geo = fieldGeometry(mapData("rows"));
    const cells = new Set(geo.plots.map((p) => `${p.xM},${p.yM}`));
    expect(cells.size).toBe(24);
  });
});

describe("fieldCell", () => {
  it("puts serpentine blocks back the other way on the field", () => {
    const layout = rcbdLayout({ treatments: ["A", "B", "C"], blocks: 2, seed: 1, arrangement: "serpentine" });
    const p201 = layout.plots.find((p) => p.plotNumber === 201)!;
    // Block 2 is reversed: position 1 sits in the third (last) column.
    expect(fieldCell(p201, "rows")).toEqual({ fieldRow: 1, fieldColumn: 2 });
    expect(fieldCell(p201, "columns")).toEqual({ fieldRow: 2, fieldColumn: 1 });
  });
});

describe("design names and drawing", () => {
  it("maps every stored design name to the layout library's", () => {
    expect(layoutDesignOf("crd")).toBe("completely_randomized");
    expect(layoutDesignOf("rcbd")).toBe("rcbd");
    expect(layoutDesignOf("factorial_rcbd")).toBe("factorial_rcbd");
    expect(layoutDesignOf("split_plot")).toBe("split_plot");
  });

  it("draws the same layout as the library for the same seed", () => {
    const treatments = ["T1", "T2", "T3"].map((code) => ({ code, factorLevels: null }));
    const drawn = drawLayout({ design: "rcbd" }, treatments, [], { blockCount: 3, arrangement: "straight", seed: 42 });
    expect(drawn).toEqual(rcbdLayout({ treatments: ["T1", "T2", "T3"], blocks: 3, seed: 42 }));
  });

  it("orders split-plot factors main first and draws a split-plot layout", () => {
    const factors = orderedFactors([
      { name: "rate", levels: ["0", "10"], stratum: "sub" as const, position: 0 },
      { name: "amendment", levels: ["compost", "manure", "leaf mould"], stratum: "main" as const, position: 1 },
    ]);
    expect(factors.map((f) => f.name)).toEqual(["amendment", "rate"]);
    const codes = ["compost", "manure", "leaf mould"].flatMap((a) => ["0", "10"].map((r) => ({ code: `${a} × ${r}`, factorLevels: null })));
    const drawn = drawLayout({ design: "split_plot" }, codes, factors, { blockCount: 2, arrangement: "straight", seed: 7 });
    expect(drawn).toEqual(splitPlotLayout({ mainFactor: factors[0], subFactor: factors[1], blocks: 2, seed: 7 }));
  });

  it("refuses a factorial whose treatments were not generated from its factors", () => {
    const factors = [{ name: "rate", levels: ["0", "10", "20"], stratum: null, position: 0 }];
    expect(() =>
      drawLayout({ design: "factorial_rcbd" }, [{ code: "T1", factorLevels: null }, { code: "T2", factorLevels: null }], factors, {
        blockCount: 3,
        arrangement: "straight",
        seed: 1,
      }),
    ).toThrow(DesignError);
  });
});

describe("treatment styles", () => {
  it("gives the check white, others the palette in order, and hatches the second round", () => {
    const index = styleIndexByCode([
      { code: "T1", name: "check", isCheck: true },
      { code: "T2", name: "a", isCheck: false },
    ]);
    expect(treatmentStyle(index.get("T1")!, true)).toEqual({ fill: "#FFFFFF", hatched: false });
    expect(treatmentStyle(index.get("T2")!, false)).toEqual({ fill: TREATMENT_FILLS[0], hatched: false });
    expect(treatmentStyle(TREATMENT_FILLS.length, false)).toEqual({ fill: TREATMENT_FILLS[0], hatched: true });
  });

  it("keeps every fill light enough for near-black labels at WCAG AA (4.5:1)", () => {
    // WCAG 2.1 relative luminance and contrast ratio, computed here; label ink #1d150e.
    const lum = (hex: string) => {
      const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
      return 0.2126 * r + 0.7152 * g + 0.0722 * b;
    };
    const ink = lum("#1d150e");
    for (const fill of TREATMENT_FILLS) expect((lum(fill) + 0.05) / (ink + 0.05)).toBeGreaterThan(4.5);
  });
});

describe("map bearing", () => {
  // The 16-point compass: each point names the 22.5° sector centred on it (common practice), so
  // 11.25° is the first bearing that rounds to NNE and 348.75° the first that rounds back to N.
  it("names the nearest of the 16 compass points", () => {
    expect([0, 11, 12, 22.5, 45, 90, 135, 180, 202.5, 270, 315, 348, 349, 359, 360, -30].map(compassPoint)).toEqual([
      "N", "N", "NNE", "NNE", "NE", "E", "SE", "S", "SSW", "W", "NW", "NNW", "N", "N", "N", "NNW",
    ]);
  });

  it("says north is at the top only when it is", () => {
    expect(orientationText(0)).toBe("north at the top");
    expect(orientationText(30)).toBe("top of the map facing 30° (NNE)");
    expect(mapAxes(0)).toEqual({ across: "east–west", along: "north–south" });
    expect(mapAxes(30).across).not.toMatch(/east|west/);
  });
});
