import { launchBrowser, signIn } from "../support/browser";
const base = "http://127.0.0.1:3134";
const browser = await launchBrowser();
for (const width of [1280, 390]) {
  const ctx = await browser.newContext({ viewport: { width, height: 900 } });
  const page = await ctx.newPage();
  page.on("console", (m) => { if (m.type() === "error") console.log("console:", m.text()); });
  await signIn(page, base, process.argv[2] ?? "researcher@cedarhollow.example");
  await page.goto(`${base}/home`);
  const href = await page.locator('a[href^="/trials/"]').first().getAttribute("href");
  const trial = href!.match(/\/trials\/[^/]+/)![0];
  await page.goto(`${base}${trial}/results${process.argv[3] ?? ""}`); console.log(trial);
  await page.waitForTimeout(4000);
  await page.screenshot({ path: `/tmp/shots/results-${width}.png`, fullPage: true });
  const figs = page.locator("[data-chart]");
  const n = await figs.count();
  for (let i = 0; i < n; i++) {
    const name = (await figs.nth(i).getAttribute("data-chart"))!.replace(".svg", "");
    await figs.nth(i).locator("xpath=..").screenshot({ path: `/tmp/shots/${name}-${width}.png` });
  }
  if (width === 1280) {
    await page.getByLabel("Residuals").check();
    await page.waitForTimeout(1500);
    await figs.nth(2).locator("xpath=..").screenshot({ path: `/tmp/shots/plot-map-residuals-${width}.png` });
  }
  await ctx.close();
}
await browser.close();
