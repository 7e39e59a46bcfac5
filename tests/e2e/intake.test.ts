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

  it("reads every intake, sampling and application-sheet page on a 390 px phone without the page scrolling sideways", async () => {
    const phone = await (await browser.newContext({ viewport: { width: 390, height: 844 } })).newPage(); // a common phone width
    await signIn(phone, baseUrl, "technician@cedarhollow.example");
    await phone.getByRole("link", { name: /Rapid organic-matter building/ }).first().click();
    await phone.waitForURL(/\/trials\/[^/]+/);
    const trial = new URL(phone.url()).pathname.match(/^\/trials\/[^/]+/)![0];
    const pageWidth = () => phone.evaluate(() => document.documentElement.scrollWidth);

    await phone.goto(`${baseUrl}${trial}/briefs`);
    const brief = await phone.locator('a[href^="/briefs/"]').first().getAttribute("href");
    for (const path of [`${trial}/application-sheet`, `${trial}/sampling`, `${trial}/intake`, brief!]) {
      await phone.goto(`${baseUrl}${path}`);
      await phone.waitForLoadState("networkidle");
      expect.soft({ path, width: await pageWidth() }).toEqual({ path, width: 390 });
    }
    // The application sheet carries the sampling pages' buried-utilities caution (app/design/cautions.ts).
    await phone.goto(`${baseUrl}${trial}/application-sheet`);
    await phone.waitForLoadState("networkidle");
    expect.soft(await phone.getByText("Locate buried utilities before driving a probe, ring or stake").count()).toBe(1);
    await screenshot(phone, "phone-application-sheet");

    // The hand-entry grid scrolls inside its box; the sample column stays in view, opaque over the inputs.
    await phone.goto(`${baseUrl}${trial}/intake`);
    await phone.getByRole("link", { name: "Enter by hand" }).first().click();
    const grid = phone.locator("form .overflow-x-auto");
    await grid.scrollIntoViewIfNeeded();
    expect.soft(await pageWidth()).toBe(390);
    const sample = await grid.evaluate((box) => {
      box.scrollLeft = box.scrollWidth;
      const cell = box.querySelector("tbody th[scope=row]")!;
      const [c, b] = [cell.getBoundingClientRect(), box.getBoundingClientRect()];
      return { scrolled: box.scrollLeft > 0, inView: c.left >= b.left && c.right <= b.right, opaque: getComputedStyle(cell).backgroundColor };
    });
    expect.soft(sample).toEqual({ scrolled: true, inView: true, opaque: "rgb(255, 255, 255)" });
    await screenshot(phone, "phone-entry-grid-scrolled");

    // Row messages in the upload review wrap inside the visible part of the table, however wide it is.
    await phone.goto(`${baseUrl}${trial}/intake`);
    await phone.getByLabel("What the file holds").selectOption("loi");
    const header = "sample_code,crucible_g,crucible_dry_soil_g,crucible_residue_g,ignition_c,ignition_hours,lab_id,notes";
    const file = `${header}\nNO-SUCH-SAMPLE-0-10,20.000,30.000,29.500,550,4,,\n`;
    await phone.getByLabel("CSV file (up to 20 MB)").setInputFiles({ name: "phone.csv", mimeType: "text/csv", buffer: Buffer.from(file) });
    await phone.getByRole("button", { name: "Upload and check" }).click();
    const message = phone.locator("tbody li").first();
    await message.waitFor();
    expect.soft(await pageWidth()).toBe(390);
    const fits = await message.evaluate((li) => {
      const box = li.closest(".overflow-x-auto")!.getBoundingClientRect();
      const text = li.getBoundingClientRect();
      return { left: text.left >= box.left, right: text.right <= box.right };
    });
    expect.soft(fits).toEqual({ left: true, right: true });
    await screenshot(phone, "phone-intake-review");
    await phone.getByRole("button", { name: "Set this upload aside" }).click();
    await phone.getByLabel("CSV file (up to 20 MB)").waitFor();
    await phone.close();
  });
});
