// axe-core on Tilthmark's main pages (as the people who use them): no serious or critical violations.
import { readFileSync } from "node:fs";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { demoTrial } from "../../datasets/demo/scenario";
import { launchBrowser, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
const axeSource = readFileSync("node_modules/axe-core/axe.min.js", "utf8");
let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

type Violation = { id: string; impact: string; nodes: { target: string[] }[] };

/** Serious and critical axe findings on the current page, one line each. */
async function seriousViolations(page: Page): Promise<string[]> {
  await page.waitForLoadState("networkidle");
  // Evaluated through the browser's debugging protocol: the page's CSP (no inline scripts) rightly refuses a script tag.
  await page.evaluate(axeSource);
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (d: Document, o: object) => Promise<{ violations: Violation[] }> } }).axe;
    return (await axe.run(document, { resultTypes: ["violations"] })).violations;
  });
  return violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.id} (${v.impact}) at ${v.nodes.map((n) => n.target.join(" ")).slice(0, 3).join(", ")}`);
}

async function pagesOf(email: string, paths: (ids: { trial: string; program: string }) => string[]) {
  const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await signIn(page, baseUrl, email);
  const program = (await page.getByRole("link", { name: "program page" }).first().getAttribute("href"))!;
  const trialLink = page.getByRole("link", { name: demoTrial.title });
  const trial = (await trialLink.count()) > 0 ? (await trialLink.first().getAttribute("href"))! : "";
  const findings: Record<string, string[]> = {};
  for (const path of ["/home", ...paths({ trial, program })]) {
    await page.goto(`${baseUrl}${path}`);
    const found = await seriousViolations(page);
    if (found.length > 0) findings[path] = found;
  }
  await page.close();
  return findings;
}

describe("accessibility (axe-core)", () => {
  it("the landing and sign-in pages", async () => {
    const page = await browser.newPage();
    const findings: Record<string, string[]> = {};
    for (const path of ["/", "/sign-in", "/forgot-password"]) {
      await page.goto(`${baseUrl}${path}`);
      const found = await seriousViolations(page);
      if (found.length > 0) findings[path] = found;
    }
    await page.close();
    expect(findings).toEqual({});
  });

  it("a researcher's and an owner's pages", async () => {
    const findings = await pagesOf("owner@cedarhollow.example", ({ trial, program }) => [
      program,
      `${program}/members`,
      trial,
      `${trial}/plot-map`,
      `${trial}/application-sheet`,
      `${trial}/results`,
      `${trial}/briefs`,
      "/account",
    ]);
    expect(findings).toEqual({});
  });

  it("a technician's pages", async () => {
    const findings = await pagesOf("technician@cedarhollow.example", ({ trial }) => [`${trial}/sampling`, `${trial}/intake`, `${trial}/data`]);
    expect(findings).toEqual({});
  });

  it("an extension agent's program page and field brief", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, baseUrl, "extension@cedarhollow.example");
    await page.getByRole("link", { name: "program page" }).first().click();
    await page.waitForURL(/\/programs\//);
    const findings: Record<string, string[]> = {};
    const programFound = await seriousViolations(page);
    if (programFound.length > 0) findings.program = programFound;
    const brief = page.locator('a[href^="/briefs/"]').first();
    await brief.click();
    await page.waitForURL(/\/briefs\//);
    const briefFound = await seriousViolations(page);
    if (briefFound.length > 0) findings.brief = briefFound;
    await page.close();
    expect(findings).toEqual({});
  });
});
