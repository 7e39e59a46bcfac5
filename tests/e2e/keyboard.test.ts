// Every form usable by keyboard alone. On each page that posts a form (each route with an action),
// Tab from the top of the page must reach every visible control of every form (the
// contents of a closed <details> count once its summary is reached); and whole tasks are done without
// the mouse: signing in, adding a site with a select and a text area, changing the results season, and choosing a lab file and uploading it.
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { ACTION_ACCESS } from "~/route-access";
import { launchBrowser, signIn } from "../support/browser";
import { type DemoRoutes, demoRoutes } from "../support/routes";

const baseUrl = inject("baseUrl");
let browser: Browser;
let demo: DemoRoutes;

beforeAll(async () => {
  browser = await launchBrowser();
  demo = await demoRoutes(baseUrl, inject("databaseUrl"));
});
afterAll(async () => {
  await browser?.close();
  await demo?.close();
});

/**
 * Tabs through the page from the top and returns the controls of post forms that Tab never
 * reached (a radio group counts as reached when one of its radios is: arrows move within it).
 */
async function unreachableControls(page: Page): Promise<string[]> {
  const total = await page.evaluate(() => {
    // checkVisibility also hides the contents of a closed <details> (opened by its summary, which Tab reaches).
    const visible = (el: Element) => el.checkVisibility({ visibilityProperty: true, contentVisibilityAuto: true });
    const controls = [...document.querySelectorAll('form[method="post"] :is(input:not([type="hidden"]), select, textarea, button)')].filter(
      (el) => visible(el) && !(el as HTMLInputElement).disabled,
    );
    controls.forEach((el, i) => el.setAttribute("data-kb", String(i)));
    const reached = new Set<string>();
    (window as unknown as { kbReached: Set<string> }).kbReached = reached;
    document.addEventListener("focusin", (e) => {
      const el = e.target as HTMLElement;
      if (el.dataset.kb) reached.add(el.dataset.kb);
    });
    (document.activeElement as HTMLElement | null)?.blur();
    return document.querySelectorAll("a[href], button, input, select, textarea, [tabindex]").length;
  });
  for (let i = 0; i < total + 5; i++) await page.keyboard.press("Tab");
  return page.evaluate(() => {
    const reached = (window as unknown as { kbReached: Set<string> }).kbReached;
    const radioGroupsReached = new Set(
      [...document.querySelectorAll('input[type="radio"][data-kb]')].filter((el) => reached.has((el as HTMLElement).dataset.kb!)).map((el) => (el as HTMLInputElement).name),
    );
    return [...document.querySelectorAll("[data-kb]")]
      .filter((el) => !reached.has((el as HTMLElement).dataset.kb!))
      .filter((el) => !((el as HTMLInputElement).type === "radio" && radioGroupsReached.has((el as HTMLInputElement).name)))
      .map((el) => {
        const c = el as HTMLInputElement;
        const label = c.labels?.[0]?.textContent?.trim() || c.getAttribute("aria-label") || c.textContent?.trim() || c.name;
        return `${c.tagName.toLowerCase()} "${label}"`;
      });
  });
}

describe("every form reachable by Tab", () => {
  it.each(["/sign-in", "/forgot-password"])("%s", async (path) => {
    const page = await browser.newPage();
    await page.goto(`${baseUrl}${path}`);
    expect(await unreachableControls(page)).toEqual([]);
    await page.close();
  });

  it("every page with an action, as the owner", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, baseUrl, "owner@cedarhollow.example");
    const found: Record<string, string[]> = {};
    const pages = Object.entries(ACTION_ACCESS).filter(([, access]) => access.kind !== "public").map(([pattern]) => pattern);
    for (const pattern of pages.filter((p) => p !== "/sign-out")) {
      const res = await page.goto(demo.urlFor(pattern));
      if (!res?.ok()) continue; // e.g. a committed upload's review page redirects; its forms are covered in intake
      const missing = await unreachableControls(page);
      if (missing.length > 0) found[pattern] = missing;
    }
    await page.close();
    expect(found).toEqual({});
  }, 240_000);
});

/** Presses Tab until the focused control has this accessible label (at most 80 presses). */
async function tabTo(page: Page, label: string | RegExp): Promise<void> {
  for (let i = 0; i < 80; i++) {
    await page.keyboard.press("Tab");
    const name = await page.evaluate(() => {
      const el = document.activeElement as HTMLInputElement | null;
      // A label wrapping a select also holds the option texts.
      const label = el?.labels?.[0]?.textContent?.replace(el.tagName === "SELECT" ? (el.textContent ?? "") : "", "").trim();
      return label || el?.getAttribute("aria-label") || el?.textContent?.trim() || "";
    });
    if (typeof label === "string" ? name === label : label.test(name)) return;
  }
  throw new Error(`Tab never reached "${label}"`);
}

/** Tilthmark's LOI template headings and one row for a sample code the trial does not have. */
const KEYBOARD_FILE = "sample_code,crucible_g,crucible_dry_soil_g,crucible_residue_g,ignition_c,ignition_hours,lab_id,notes\nKB-1,20.000,30.000,29.500,550,4,,\n";

describe("tasks done with the keyboard alone", () => {
  it("a researcher signs in, adds a site and changes the results season", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await page.goto(`${baseUrl}/sign-in`);
    await tabTo(page, "E-mail");
    await page.keyboard.type("researcher@cedarhollow.example");
    await tabTo(page, "Password");
    await page.keyboard.type("tilthmark-demo");
    await page.keyboard.press("Enter");
    await page.waitForURL(`${baseUrl}/home`);

    await page.goto(demo.urlFor("/programs/:programId/sites"));
    await tabTo(page, "Site name");
    await page.keyboard.type("Keyboard Ridge");
    await tabTo(page, "USDA texture class");
    await page.keyboard.press("ArrowDown"); // the first class after "not recorded"
    await tabTo(page, "Notes");
    await page.keyboard.type("Entered without a mouse.");
    await tabTo(page, "Save site");
    await page.keyboard.press("Enter");
    await page.getByRole("heading", { name: "Keyboard Ridge" }).waitFor();
    expect(await page.getByLabel("USDA texture class").inputValue()).not.toBe("");

    await page.goto(demo.urlFor("/trials/:trialId/results"));
    await tabTo(page, "Season");
    const before = await page.evaluate(() => (document.activeElement as HTMLSelectElement).value);
    await page.keyboard.press("ArrowDown");
    await expect.poll(() => new URL(page.url()).searchParams.get("season"), { timeout: 15_000 }).not.toBe(before);
    await page.close();
  });

  it("a technician chooses a lab file and uploads it", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, baseUrl, "technician@cedarhollow.example");
    await page.goto(demo.urlFor("/trials/:trialId/intake"));
    await tabTo(page, "CSV file (up to 20 MB)");
    const [chooser] = await Promise.all([page.waitForEvent("filechooser"), page.keyboard.press("Space")]);
    await chooser.setFiles({ name: "keyboard-loi.csv", mimeType: "text/csv", buffer: Buffer.from(KEYBOARD_FILE) });
    await tabTo(page, "Upload and check");
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/intake\/[0-9a-f-]{36}$/);
    // Set aside again with the keyboard, so the demo's intake list is as seeded for other journeys.
    await tabTo(page, "Set this upload aside");
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/intake$/);
    await page.close();
  });
});
