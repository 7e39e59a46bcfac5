// A researcher publishes a field brief; an extension agent reads, prints and downloads it.
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { demoBrief, demoTrial } from "../../datasets/demo/scenario";
import { launchBrowser, latestMailLink, screenshot, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function newPage(width = 1280): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height: 900 }, acceptDownloads: true });
  return context.newPage();
}

const heading = (page: Page) => page.getByRole("heading", { level: 1 }).innerText();

describe("field briefs", () => {
  let briefUrl = "";

  it("a researcher drafts and publishes a brief from the current results", async () => {
    const page = await newPage();
    await signIn(page, baseUrl, "researcher@cedarhollow.example");
    // Other journeys add trials to the demo program; open the demo trial by its title.
    await page.getByRole("link", { name: demoTrial.title }).first().click();
    await page.getByRole("link", { name: "Field briefs" }).click();
    await page.getByRole("button", { name: "Draft" }).click();
    await page.getByRole("button", { name: "Publish field brief" }).waitFor();
    await screenshot(page, "brief-draft");
    await page.getByLabel("Title").fill("Compost and soil organic matter at Cedar Hollow");
    await page.getByRole("button", { name: "Publish field brief" }).click();
    await page.waitForURL(/\/briefs\/[0-9a-f-]+\/v\/1$/);
    briefUrl = page.url();
    await expect.poll(() => heading(page), { timeout: 15_000 }).toBe("Compost and soil organic matter at Cedar Hollow");
    expect(await page.locator("table").count()).toBeGreaterThan(0);
    await page.locator("figure svg").first().waitFor();
    await screenshot(page, "brief");
    await page.context().close();
  });

  it("an extension agent is told by e-mail, reads it in US units and downloads the table", async () => {
    const page = await newPage();
    const link = await latestMailLink(page, baseUrl, "extension@cedarhollow.example", "/briefs/");
    await signIn(page, baseUrl, "extension@cedarhollow.example");
    await page.goto(link);
    await expect.poll(() => heading(page), { timeout: 15_000 }).toBe("Compost and soil organic matter at Cedar Hollow");
    await page.getByRole("link", { name: "US customary" }).click();
    await page.waitForURL(/units=us/);
    const download = page.waitForEvent("download");
    await page.getByRole("link", { name: "Summary table (CSV)" }).click();
    const file = await download;
    expect(file.suggestedFilename()).toMatch(/^field-brief-.*-v1\.csv$/);
    await screenshot(page, "brief-extension");
    await page.context().close();
  });

  /** Every same-site link on /home and on the program page, followed with the signed-in person's own cookie. */
  async function linkStatuses(page: Page) {
    const programHref = await page.getByRole("link", { name: "program page" }).getAttribute("href");
    const found: { from: string; href: string; status: number }[] = [];
    for (const path of ["/home", programHref!]) {
      await page.goto(`${baseUrl}${path}`);
      await page.getByRole("heading", { level: 1 }).waitFor();
      const hrefs = await page.locator("a[href]").evaluateAll((links) => links.map((a) => a.getAttribute("href")!));
      for (const href of new Set(hrefs.filter((h) => h.startsWith("/") && !h.startsWith("//")))) {
        // The context's request client sends the context's cookies, i.e. this person's session.
        const res = await page.context().request.get(`${baseUrl}${href}`, { maxRedirects: 0 });
        found.push({ from: path, href, status: res.status() });
      }
    }
    return found;
  }

  it("offers an extension agent on /home and the program page only links they can open, the demo brief among them", async () => {
    const page = await newPage();
    await signIn(page, baseUrl, "extension@cedarhollow.example");
    const links = await linkStatuses(page);
    expect(links.length).toBeGreaterThan(4);
    expect(links.filter((l) => l.status !== 200)).toEqual([]);
    await page.goto(`${baseUrl}/home`);
    // The seeded demo brief (app/.server/seed.ts publishes demoBrief) is linked from /home.
    const demoLink = page.getByRole("link", { name: demoBrief.title });
    expect(await demoLink.count()).toBe(1);
    expect(await demoLink.getAttribute("href")).toMatch(/^\/briefs\/[0-9a-f-]{36}$/);
    // So is the brief the researcher published above.
    expect(await page.getByRole("link", { name: "Compost and soil organic matter at Cedar Hollow" }).count()).toBe(1);
    await page.context().close();
  });

  it("keeps a collaborator's home on the trials, every link of it open to them", async () => {
    const page = await newPage();
    await signIn(page, baseUrl, "collaborator@cedarhollow.example");
    expect(await page.getByRole("link", { name: demoTrial.title }).first().getAttribute("href")).toMatch(/^\/trials\/[0-9a-f-]{36}$/);
    expect(await page.getByRole("link", { name: demoBrief.title }).count()).toBe(0);
    const links = await linkStatuses(page);
    expect(links.some((l) => l.from === "/home" && l.href.startsWith("/trials/"))).toBe(true);
    expect(links.filter((l) => l.status !== 200)).toEqual([]);
    await page.context().close();
  });

  it("stays closed to signed-out visitors while private", async () => {
    const page = await newPage(390);
    await page.goto(briefUrl);
    expect(page.url()).toContain("/sign-in?redirectTo=");
    await page.context().close();
  });
});
