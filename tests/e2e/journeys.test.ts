// What each kind of user does first, in a real browser against the production build.
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, beforeEach, afterEach, describe, expect, inject, it } from "vitest";
import { ROLE_LABELS } from "~/permissions";
import { demoProgram, demoUsers } from "../../datasets/demo/scenario";
import { latestMailLink, launchBrowser, screenshot, signIn } from "../support/browser";

const baseUrl = inject("baseUrl");
let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});
beforeEach(async () => {
  const context = await browser.newContext({ viewport: { width: 1280, height: 860 } });
  page = await context.newPage();
});
afterEach(async () => {
  await page.context().close();
});

describe("signed out", () => {
  it("shows the landing page and sends protected pages to sign-in", async () => {
    await page.goto(baseUrl);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toContain("Run the trial that answers it");
    await screenshot(page, "landing");
    await page.goto(`${baseUrl}/home`);
    expect(page.url()).toBe(`${baseUrl}/sign-in?redirectTo=%2Fhome`);
    await screenshot(page, "sign-in");
  });
});

describe.each(demoUsers.map((u) => ({ ...u })))("$role", ({ role, email, name }) => {
  it("signs in and sees their program and role on the home page", async () => {
    await signIn(page, baseUrl, email);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe(`Welcome, ${name.split(" ")[0]}`);
    const section = page.getByRole("heading", { level: 2, name: demoProgram.name });
    expect(await section.count()).toBe(1);
    expect(await page.getByText(`Your role: ${ROLE_LABELS[role].label}`).count()).toBe(1);
    await screenshot(page, `home-${role}`);
  });
});

describe("technician", () => {
  it("gets a 403 page on the members page", async () => {
    await signIn(page, baseUrl, "technician@cedarhollow.example");
    const programHref = await page.getByRole("link", { name: "program page" }).getAttribute("href");
    const response = await page.goto(`${baseUrl}${programHref}/members`);
    expect(response?.status()).toBe(403);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("You don't have access to this");
    await screenshot(page, "members-403-technician");
  });
});

describe("owner", () => {
  it("invites a collaborator whose one-time link creates the account", async () => {
    await signIn(page, baseUrl, "owner@cedarhollow.example");
    await page.getByRole("link", { name: "program page" }).click();
    await page.getByRole("link", { name: /Members/ }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("Who works in this program");

    // A mistyped address gets a message beside the field and nothing is sent.
    await page.getByLabel("E-mail", { exact: true }).fill("not-an-address");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText("Enter an e-mail address like name@example.org.").waitFor({ state: "visible" });

    await page.getByLabel("E-mail", { exact: true }).fill("mira.quell@uni.example");
    await page.getByLabel("Role", { exact: true }).selectOption("collaborator");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText("Invitation sent to mira.quell@uni.example as collaborator.").waitFor({ state: "visible" });
    await screenshot(page, "members-owner");

    const link = await latestMailLink(page, baseUrl, "mira.quell@uni.example", "/invitations/");
    const visitor = await browser.newContext();
    const guest = await visitor.newPage();
    await guest.goto(link);
    await expect.poll(() => guest.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe(`Join ${demoProgram.name}`);
    await guest.getByLabel("Your name").fill("Mira Quell");
    await guest.getByLabel("Choose a password").fill("miras-long-password");
    await guest.getByLabel("Password again").fill("miras-long-password");
    await guest.getByRole("button", { name: "Create account and join" }).click();
    await guest.waitForURL(/\/programs\//);
    await guest.getByText("You are collaborator here", { exact: false }).waitFor({ state: "visible" });
    await visitor.close();

    const second = await browser.newContext();
    const other = await second.newPage();
    await other.goto(link);
    await expect.poll(() => other.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("This invitation can't be used");
    await other.getByText("This invitation has already been used.", { exact: false }).waitFor({ state: "visible" });
    await second.close();
  });
});

describe("anyone with an account", () => {
  it("resets a forgotten password from the e-mailed link", async () => {
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.waitForURL(`${baseUrl}/forgot-password`);
    // Mira's account comes from the invitation journey above; demo accounts keep their password for other files.
    await page.getByLabel("E-mail").fill("mira.quell@uni.example");
    await page.getByRole("button", { name: "Send reset link" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("Check your e-mail");

    const link = await latestMailLink(page, baseUrl, "mira.quell@uni.example", "/reset-password");
    await page.goto(link);
    await page.getByLabel("New password", { exact: true }).fill("a-fresh-password-1");
    await page.getByLabel("New password again").fill("a-fresh-password-1");
    await page.getByRole("button", { name: "Set new password" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("Password changed");

    await signIn(page, baseUrl, "mira.quell@uni.example", "a-fresh-password-1");
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText(), { timeout: 15_000 }).toBe("Welcome, Mira");
  });
});
