// The plot map drawn for a narrow field with long words (a draft's warning, a long site name, a
// turned map), measured in Chromium: every line of text ends inside the drawing, so nothing is cut
// off on screen, in print or in the SVG download. (Rendered here with React; no server needed.)
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, expect, it } from "vitest";
import { rcbdLayout } from "../../analysis/design";
import { fieldCell } from "~/.server/design/draw";
import { PlotMapSvg } from "~/components/plot-map";
import type { PlotMapData } from "~/design/plot-map";
import { launchBrowser } from "../support/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

function narrowField(bearing: number): PlotMapData {
  const layout = rcbdLayout({ treatments: ["T1", "T2", "T3"], blocks: 2, seed: 7 });
  return {
    trial: {
      id: "narrow",
      title: "Spent coffee grounds on a narrow strip",
      status: "draft",
      design: "rcbd",
      seed: 2_000_000_001,
      arrangement: "serpentine",
      blockOrientation: "rows",
      mapBearingDeg: bearing,
      plotLengthM: 2,
      plotWidthM: 1.5,
      alleyBetweenPlotsM: 0.5,
      alleyBetweenBlocksM: 1,
      lockedAt: null,
      siteName: "Long Meadow experimental station, lower terrace",
    },
    unitSystem: "si",
    treatments: [
      { code: "T1", name: "Untreated check", isCheck: true },
      { code: "T2", name: "Spent coffee grounds with shredded leaf mould, 12 Mg DM/ha", isCheck: false },
      { code: "T3", name: "Cardboard sheet mulch under 10 cm of wood chips", isCheck: false },
    ],
    plots: layout.plots.map((p) => ({
      plotNumber: p.plotNumber,
      block: p.block!,
      position: p.position,
      mainPlot: null,
      treatment: p.treatment,
      ...fieldCell(p, "rows"),
    })),
  };
}

for (const bearing of [0, 30]) {
  it(`keeps every line inside the drawing (map top facing ${bearing}°)`, async () => {
    const page = await browser.newPage();
    await page.setContent(`<!doctype html><body style="margin:0">${renderToStaticMarkup(createElement(PlotMapSvg, { data: narrowField(bearing) }))}</body>`);
    const { width, overflow } = await page.locator("svg").evaluate((svg: SVGSVGElement) => {
      const w = svg.viewBox.baseVal.width;
      return {
        width: w,
        overflow: [...svg.querySelectorAll("text")].filter((t) => t.getBBox().x + t.getBBox().width > w).map((t) => t.textContent),
      };
    });
    expect(width).toBeGreaterThan(0);
    expect(overflow).toEqual([]);
    await page.close();
  });
}
