// Debian's Chromium driven by playwright-core. Never downloads a browser.
import { mkdirSync } from "node:fs";
import { type Browser, type Page, chromium } from "playwright-core";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    args: [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-background-networking",
      "--disable-component-update",
      "--no-first-run",
      "--disable-sync",
      "--disable-quic",
    ],
  });
}

export const SCREENSHOT_DIR = "tests/e2e/screenshots";

export async function screenshot(page: Page, name: string) {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: `${SCREENSHOT_DIR}/${name}.png`, fullPage: true });
}

export async function signIn(page: Page, baseUrl: string, email: string, password = DEMO_PASSWORD) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(`${baseUrl}/home`);
}

/** The newest message the SMTP fake caught for an address, read from /dev/mailbox. */
export async function latestMailLink(page: Page, baseUrl: string, address: string, pathPart: string): Promise<string> {
  for (let attempt = 0; attempt < 20; attempt++) {
    await page.goto(`${baseUrl}/dev/mailbox`);
    const mail = page.getByTestId("mail").filter({ hasText: address }).first();
    if ((await mail.count()) > 0) {
      const href = await mail.locator(`a[href*="${pathPart}"]`).first().getAttribute("href");
      if (href) return href;
    }
    await page.waitForTimeout(250);
  }
  throw new Error(`no mail with a ${pathPart} link arrived for ${address}`);
}
