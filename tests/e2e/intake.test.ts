// A technician's lab-intake journey in a real browser: new sampling event, template download,
// an upload with one bad row, the row error, the fixed file, commit, derived SOM in the data table.
import { readFileSync } from "node:fs";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { launchBrowser, screenshot, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await (await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true })).newPage();
});
afterAll(async () => {
  await browser?.close();
});

describe("technician", () => {
  it("uploads LOI results, fixes a bad row, commits and sees SOM in the data table", async () => {
    await signIn(page, baseUrl, "technician@cedarhollow.example");
    await page.getByRole("link", { name: /Rapid organic-matter building/ }).first().click();
    await page.getByRole("link", { name: "Sampling", exact: true }).click();
    await page.getByLabel("Season").fill("2028 spring");
    await page.getByLabel("Sampling date").fill("2028-04-18");
    await page.getByRole("button", { name: "Create event and sample codes" }).click();
    await page.getByText("Event E7 created with 72 sample codes.").waitFor();
    await page.getByRole("link", { name: "Open its sample sheet" }).click();
    await page.getByText("Locate buried utilities before coring").waitFor();
    await screenshot(page, "intake-sample-sheet");
    await page.getByRole("link", { name: "Print bag labels" }).click();
    await expect.poll(() => page.locator("li svg").count(), { timeout: 15_000 }).toBe(72);
    await screenshot(page, "intake-bag-labels");

    await page.getByRole("link", { name: "Lab intake" }).click();
    await page.getByText("Muffle furnaces run at 550 °C").waitFor();
    const e7 = page.locator("li", { hasText: "E7 2028 spring" });
    const [download] = await Promise.all([page.waitForEvent("download"), e7.getByRole("link", { name: "LOI template" }).click()]);
    const template = readFileSync((await download.path())!, "utf8").replace(/^\uFEFF/, "").trim().split(/\r\n/);
    expect(template[0]).toBe("sample_code,crucible_g,crucible_dry_soil_g,crucible_residue_g,ignition_c,ignition_hours,lab_id,notes");
    // DESIGN.md's weighings (20.000 / 30.000 / 29.500 g → LOI 5.00 %) in the first row, residues varying a
    // little in the others (so the season can be analysed: identical values leave no residual variance);
    // the 5th data row (spreadsheet row 6) has ash heavier than the dry soil.
    const weighings = (l: string, residue: string) => l.replace(/,,,,,,,$/, `,20.000,30.000,${residue},550,4,,`);
    const residue = (i: number) => (29.5 - (i % 9) * 0.011).toFixed(3);
    const filled = template.slice(1).map((l, i) => weighings(l, residue(i)));
    const bad = [template[0], ...template.slice(1).map((l, i) => weighings(l, i === 4 ? "31.200" : residue(i)))].join("\n");

    await page.getByLabel("What the file holds").selectOption("loi");
    await page.getByLabel("CSV file (up to 20 MB)").setInputFiles({ name: "e7-loi.csv", mimeType: "text/csv", buffer: Buffer.from(bad) });
    await page.getByRole("button", { name: "Upload and check" }).click();
    await page.getByText("71 ok").waitFor();
    await page.getByRole("link", { name: "Errors and warnings only" }).click();
    const error = page.getByText(/Error, row 6, column crucible_residue_g: The ignited residue/);
    await error.waitFor();
    await screenshot(page, "intake-review-error");
    expect(await page.getByRole("button", { name: /^Commit/ }).count()).toBe(0);

    await page.getByRole("button", { name: "Set this upload aside" }).click();
    await page.getByLabel("CSV file (up to 20 MB)").setInputFiles({ name: "e7-loi-fixed.csv", mimeType: "text/csv", buffer: Buffer.from([template[0], ...filled].join("\n")) });
    await page.getByRole("button", { name: "Upload and check" }).click();
    await page.getByText("72 ok").waitFor();
    await screenshot(page, "intake-review-ok");
    await page.getByRole("button", { name: "Commit 72 rows" }).click();

    await page.getByText("Committed. The values below are derived").waitFor();
    const row = page.locator("tr", { hasText: "E7-101-0-10" });
    await expect.poll(() => row.locator('td[data-column="som"]').innerText(), { timeout: 15_000 }).toBe("5.00");
    expect(await row.locator('td[data-column="soc"]').innerText()).toBe("2.90"); // DESIGN.md: 5.00 % SOM → 2.90 % SOC
    await screenshot(page, "intake-data-table");
  });
});
