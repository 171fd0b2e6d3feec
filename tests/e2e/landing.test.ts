// Browser check of the public pages, in Debian's Chromium.
import { describe, expect, it } from "vitest";
import { screenshot, url, useBrowser } from "../support/browser";
import { appUrl } from "../support/services";

const browser = useBrowser();

describe("landing page", () => {
  it("renders the job of the product, the cautions and the shipped font", async () => {
    const page = await browser.newPage();
    const failed: string[] = [];
    page.on("response", (r) => {
      // The document and its assets must load (link prefetches are not part of this check).
      if (r.status() >= 400 && !r.url().includes("_rsc=")) failed.push(`${r.status()} ${r.url()}`);
    });
    const external: string[] = [];
    page.on("request", (r) => {
      // Same-origin only: the app's own URLs, data: and blob: URLs the page made itself (the
      // sign-in script runs its timers in a same-origin blob: worker).
      const u = r.url();
      if (!u.startsWith(appUrl()) && !u.startsWith("data:") && !u.startsWith(`blob:${appUrl()}`)) external.push(u);
    });
    await page.goto(appUrl(), { waitUntil: "load" });
    await expect(page.locator("h1").innerText()).resolves.toMatch(/one-way channels/);
    await expect(page.getByText("predictions of a phenomenological model").count()).resolves.toBe(1);
    const family = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(family).toMatch(/sans/i);
    const fontsLoaded = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].filter((f) => f.status === "loaded").length;
    });
    expect(fontsLoaded).toBeGreaterThan(0);
    expect(failed).toEqual([]);
    expect(external).toEqual([]);
    await screenshot(page, "landing.png");
    await page.close();
  });

  it("shows the health endpoint's JSON", async () => {
    const page = await browser.newPage();
    const res = await page.goto(url("/api/v1/health"));
    expect(res?.status()).toBe(200);
    const body = JSON.parse(await page.locator("body").innerText());
    expect(body.database.status).toBe("ok");
    await page.close();
  });
});
