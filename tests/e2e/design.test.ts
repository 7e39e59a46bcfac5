// A researcher designs a trial in the browser: a 5-treatment × 4-block RCBD from an empty form to a
// locked plot map and application sheet, downloaded as SVG and CSV.
import { readFileSync } from "node:fs";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { launchBrowser, screenshot, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  page = await context.newPage();
  page.on("dialog", (dialog) => dialog.accept());
});
afterAll(async () => {
  await browser?.close();
});

const heading = () => page.getByRole("heading", { level: 1 }).innerText();

describe("researcher", () => {
  it("creates, randomizes and locks a 5 × 4 RCBD, then downloads the plot map and application sheet", async () => {
    await signIn(page, baseUrl, "researcher@cedarhollow.example");
    await page.getByRole("link", { name: "program page" }).click();
    await page.getByRole("link", { name: "New trial" }).click();
    await expect.poll(heading, { timeout: 15_000 }).toBe("Set up a trial");

    await page.getByLabel("Title").fill("Compost rate trial, west field");
    await page.getByLabel("Plot length (m)").fill("6");
    await page.getByLabel("Plot width (m)").fill("");
    await page.getByLabel("Alley between plots (m)").fill("1");
    await page.getByLabel("Alley between blocks (m)").fill("2");
    await page.getByLabel("Blocks (replicates)").fill("4");
    await page.getByRole("button", { name: "Create trial" }).click();
    // A missing width is reported beside its field and the title is kept.
    await page.getByText("Enter plot width.").waitFor();
    expect(await page.getByLabel("Title").inputValue()).toBe("Compost rate trial, west field");
    await page.getByLabel("Plot width (m)").fill("3");
    await page.getByRole("button", { name: "Create trial" }).click();
    await page.waitForURL(/\/trials\/[0-9a-f-]{36}\/treatments$/);
    const trialPath = new URL(page.url()).pathname.replace(/\/treatments$/, "");

    const treatments = [
      ["T1", "Untreated check"],
      ["T2", "Yard-waste compost 10 Mg/ha"],
      ["T3", "Yard-waste compost 20 Mg/ha"],
      ["T4", "Aged cattle manure 15 Mg/ha"],
      ["T5", "Leaf mould 10 Mg/ha"],
    ];
    for (const [code, name] of treatments) {
      await page.getByLabel("Code").fill(code);
      await page.getByLabel("Name").fill(name);
      if (code === "T1") await page.getByLabel("Untreated check (receives no amendment)").check();
      await page.getByRole("button", { name: "Add treatment" }).click();
      await page.getByRole("heading", { level: 3, name: new RegExp(`^${code}`) }).waitFor();
    }
    expect(await page.getByTestId("treatment").count()).toBe(5);

    await page.getByRole("link", { name: "Add an application to T2" }).click();
    await page.getByLabel("Batch").selectOption({ label: "Yard-waste compost — YWC-2025-A" });
    await page.getByLabel("Dry-matter rate (Mg DM/ha)").fill("10");
    await page.getByLabel("Timing").selectOption("each_season");
    await page.getByRole("button", { name: "Add application" }).click();
    await page.getByText("Application added.").waitFor();
    await screenshot(page, "design-treatments");

    await page.getByRole("link", { name: "Randomization", exact: true }).click();
    await page.getByRole("button", { name: "Randomize", exact: true }).click();
    await page.getByText(/Randomized with seed \d+: 20 plots drawn\./).waitFor();
    const map = page.getByTestId("plot-map");
    await map.waitFor();
    for (const n of ["101", "205", "405"]) expect(await map.locator("text", { hasText: new RegExp(`^${n}$`) }).count()).toBe(1);
    const firstSeed = await page.getByTestId("seed").innerText();

    await page.getByRole("button", { name: "Randomize again" }).click();
    await expect.poll(() => page.getByTestId("seed").innerText(), { timeout: 15_000 }).not.toBe(firstSeed);
    await page.getByRole("button", { name: "Lock design" }).click();
    await page.getByText("Design locked.", { exact: false }).waitFor();
    await expect.poll(() => page.getByRole("button", { name: "Randomize again" }).count(), { timeout: 15_000 }).toBe(0);
    await page.getByText(/^Locked on/).waitFor();
    await screenshot(page, "design-randomization-locked");

    await page.goto(`${baseUrl}${trialPath}/plot-map`);
    await page.getByTestId("plot-map").waitFor();
    await screenshot(page, "design-plot-map");
    const [svgDownload] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download SVG" }).click()]);
    expect(svgDownload.suggestedFilename()).toBe("plot-map-Compost-rate-trial-west-field.svg");
    const svg = readFileSync((await svgDownload.path())!, "utf8");
    expect(svg).toContain("<svg");
    expect(svg).toContain(">405</text>");
    // Hand calculation: 5 plots × 3 m + 4 alleys × 1 m = 19 m across.
    expect(svg).toContain(">19.0 m</text>");
    await page.emulateMedia({ media: "print" });
    await screenshot(page, "design-plot-map-print");
    await page.emulateMedia({ media: "screen" });

    // The field runs north-north-east: the map keeps its layout and the north arrow turns.
    expect(svg).toContain("north at the top");
    await page.getByLabel("Top of the map faces (° from true north)").fill("400");
    await page.getByRole("button", { name: "Save orientation" }).click();
    await page.getByText("The bearing must be at most 359", { exact: false }).waitFor();
    await page.getByLabel("Top of the map faces (° from true north)").fill("30");
    await page.getByRole("button", { name: "Save orientation" }).click();
    await page.getByText("The map now shows the top of the map facing 30° (NNE).").waitFor();
    await expect.poll(() => map.locator("[data-bearing]").getAttribute("data-bearing"), { timeout: 10_000 }).toBe("30");
    expect(await map.getByText("top 30° NNE").count()).toBe(1);
    await screenshot(page, "design-plot-map-turned");
    const [turned] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download SVG" }).click()]);
    const turnedSvg = readFileSync((await turned.path())!, "utf8");
    expect(turnedSvg).toContain("top of the map facing 30° (NNE)");
    expect(turnedSvg).not.toContain("east–west");
    expect(turnedSvg).toContain(">405</text>");

    await page.getByRole("link", { name: "Application sheet" }).click();
    await page.getByTestId("application-sheet").waitFor();
    await page.getByText("Manure and immature compost can carry pathogens", { exact: false }).first().waitFor();
    await screenshot(page, "design-application-sheet");
    const [csvDownload] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download CSV" }).click()]);
    const csv = readFileSync((await csvDownload.path())!, "utf8");
    const t2Rows = csv.split("\r\n").filter((line) => line.includes(",T2,"));
    expect(t2Rows).toHaveLength(4);
    // DESIGN.md worked check: 10 Mg DM/ha on 18 m² at 38 % moisture = 29.03 kg as-is.
    for (const row of t2Rows) expect(row).toContain(",YWC-2025-A,Each season,10,29.03,");
  });
});
