// Reading results in a real browser: a collaborator's journey, a researcher's contrasts, and every
// chart photographed at laptop and phone widths (tests/e2e/screenshots/; look at them).
import { readFileSync } from "node:fs";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { demoTrial } from "../../datasets/demo/scenario";
import { launchBrowser, SCREENSHOT_DIR, screenshot, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function openResults(page: Page, email: string): Promise<string> {
  await signIn(page, baseUrl, email);
  // Other journeys add trials to the demo program; open the demo trial by its title.
  await page.getByRole("link", { name: demoTrial.title }).first().click();
  await page.getByRole("navigation", { name: "Trial sections" }).getByRole("link", { name: "Results" }).click();
  await page.waitForURL(/\/results/);
  return new URL(page.url()).pathname.replace(/\/results$/, "");
}

const chart = (page: Page, name: string) => page.locator(`[data-chart="${name}.svg"]`);
const meansTable = (page: Page) => page.getByRole("table", { name: "Treatment means" });

describe("collaborator", () => {
  it("opens results, sees one line per treatment, changes the season and downloads the ANOVA table", async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const page = await context.newPage();
    // The Content-Security-Policy allows no inline script without the nonce: hydration and the
    // charts must run without a single violation.
    const violations: string[] = [];
    page.on("console", (m) => m.text().includes("Content Security Policy") && violations.push(m.text()));
    await openResults(page, "collaborator@cedarhollow.example");

    // The demo trial has no LOI-to-SOM calibration, so the page says why SOM and LOI agree.
    await page.getByText("SOM is taken equal to LOI: this trial has no LOI-to-SOM calibration", { exact: false }).waitFor();

    // Means over seasons: Observable Plot draws one path per series in the line mark.
    const lines = chart(page, "season-means").locator('g[aria-label="line"] path');
    await expect.poll(() => lines.count(), { timeout: 20_000 }).toBe(6); // DESIGN.md demo: 6 treatments
    expect(await chart(page, "season-means").locator("svg").first().getAttribute("role")).toBe("img");

    const firstMean = () => meansTable(page).locator("tbody tr").first().locator("td").nth(1).innerText();
    const before = await firstMean();
    await page.getByRole("combobox", { name: "Season", exact: true }).selectOption("2025 fall");
    await page.waitForURL(/season=2025\+fall/);
    await expect.poll(firstMean, { timeout: 15_000 }).not.toBe(before);
    expect(await page.getByText("in 2025 fall").count()).toBeGreaterThan(0);

    const download = page.waitForEvent("download");
    await page.getByRole("link", { name: "ANOVA table (CSV)" }).click();
    const file = await (await download).path();
    const text = readFileSync(file, "utf8").replace(/^\uFEFF/, "");
    expect(text.split("\r\n")[0]).toBe("variable,unit,depth,model,season,source,df,ss,ms,f,p,error_term");
    expect(text).toContain("2025 fall,treatment,5,");

    // Switching to equivalent-soil-mass stocks keeps the depth box saying what the numbers are for.
    await page.getByRole("combobox", { name: "Depth", exact: true }).selectOption("0-10");
    await page.getByRole("combobox", { name: "Variable", exact: true }).selectOption("soc_stock_esm");
    await page.waitForURL(/variable=soc_stock_esm/);
    await page.getByText("SOC stock (equivalent soil mass)", { exact: true }).first().waitFor();
    const depthBox = page.getByRole("combobox", { name: "Depth", exact: true });
    await expect.poll(() => depthBox.inputValue(), { timeout: 15_000 }).toBe("0-10");
    expect(await page.locator("main p strong").first().innerText()).toBe("SOC stock (equivalent soil mass)");
    expect(await page.locator("main p").filter({ hasText: "SOC stock (equivalent soil mass) at" }).first().innerText()).toContain("0–10 cm");
    expect(await depthBox.locator("option").allInnerTexts()).toEqual(["0–10 cm", "0–20 cm (cumulative)", "0–30 cm (cumulative)"]);

    // Collaborators read contrasts but get no editor.
    await page.getByRole("link", { name: "All contrasts" }).click();
    await page.getByRole("heading", { name: /Saved contrasts/ }).waitFor();
    expect(await page.getByRole("button", { name: "Save contrast" }).count()).toBe(0);
    expect(violations).toEqual([]);
    await context.close();
  });
});

describe("researcher", () => {
  it("adds the treatment-vs-check contrasts, is told the set is not orthogonal, and is stopped by a sum that is not zero", async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await openResults(page, "researcher@cedarhollow.example");
    await page.getByRole("link", { name: "Write or add contrasts" }).click();
    await page.getByRole("button", { name: "Add: Each treatment vs the check" }).click();
    await page.getByText("Added 5 contrasts.").waitFor();
    await page.getByText("Not an orthogonal set.").waitFor();

    await page.getByLabel("Name").fill("Lopsided");
    await page.locator("#coef-T2").fill("1");
    await page.locator("#coef-T1").fill("-0.5");
    expect(await page.locator("#coefficients-sum").innerText()).toContain("not yet zero");
    await page.getByRole("button", { name: "Save contrast" }).click();
    await page.getByText("The coefficients sum to 0.5; a contrast's coefficients must sum to zero").waitFor();
    expect(await page.locator("#coef-T1").inputValue()).toBe("-0.5");
    await screenshot(page, "contrasts-editor-1280");
    await context.close();
  });
});

describe("every chart at laptop and phone widths", () => {
  const CHARTS = ["season-means", "plot-values", "plot-map-values", "depth-profile", "stocks-fixed-vs-esm", "residual-checks", "contrasts"];

  it.each([1280, 390])("draws each chart with a caption at %i px", async (width) => {
    const context = await browser.newContext({ viewport: { width, height: 900 } });
    const page = await context.newPage();
    const trial = await openResults(page, "researcher@cedarhollow.example");
    // The season with the demo's outlier shows flagged residuals.
    await page.goto(`${baseUrl}${trial}/results?variable=som&depth=0-10&model=per_season&season=2026+spring`);
    for (const name of CHARTS) {
      const holder = chart(page, name);
      await expect.poll(() => holder.locator("svg").count(), { timeout: 20_000 }).toBeGreaterThan(0);
      const panel = holder.locator("xpath=..");
      expect(await panel.locator("figcaption").innerText()).not.toBe("");
      expect(await panel.getByRole("alert").count()).toBe(0);
      await panel.screenshot({ path: `${SCREENSHOT_DIR}/chart-${name}-${width}.png` });
    }
    await page.getByLabel("Residuals").check();
    await expect.poll(() => chart(page, "plot-map-residuals").locator("svg").count(), { timeout: 20_000 }).toBeGreaterThan(0);
    await chart(page, "plot-map-residuals").locator("xpath=..").screenshot({ path: `${SCREENSHOT_DIR}/chart-plot-map-residuals-${width}.png` });
    await screenshot(page, `results-${width}`);
    await context.close();
  });
});
