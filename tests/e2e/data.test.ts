// Measured data in the browser: drop the demo CSV (synthetic LK-07) on the upload page, map its
// columns and units, see the preview, save; run the period analysis and see the spectrum and the
// twist angle; start a fit and see the overlay of data and model and the table of values with
// uncertainties. Screenshots go to tests/e2e/screenshots/.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { screenshot, url, useBrowser } from "../support/browser";

const browser = useBrowser();

let page: Page;
const csv = readFileSync(join(import.meta.dirname, "..", "..", "src", "server", "demo", "lk07.csv"), "utf8");
const name = `LK-07 upload ${Date.now().toString(36)}`;

beforeAll(async () => {
  page = await browser.signedInPage("researcher");
});
const shot = (file: string) => screenshot(page, file);

describe("datasets and fits in the browser", () => {
  it("uploads the demo CSV by drag and drop, maps columns and shows the preview", async () => {
    await page.goto(url("/datasets/new"));
    await page.getByRole("heading", { name: "Upload a measured curve" }).waitFor();
    const dt = await page.evaluateHandle((text) => {
      const d = new DataTransfer();
      d.items.add(new File([text], "lk07.csv", { type: "text/csv" }));
      return d;
    }, csv);
    await page.dispatchEvent("[data-testid=drop-zone]", "drop", { dataTransfer: dt });
    await page.locator("#x-column").waitFor();
    await expect(page.locator("[data-testid=csv-preview] th").allInnerTexts()).resolves.toEqual(["B (T)", "G (e2/h)", "sigma (e2/h)"]);
    // A wrong unit is caught with row and column before anything is sent.
    await page.selectOption("#x-unit", "mT");
    await expect(page.locator("[data-testid=csv-issues]").innerText()).resolves.toMatch(/row 5 · B \(T\)/);
    await page.selectOption("#x-column", "B (T)");
    await page.selectOption("#x-unit", "T");
    await page.selectOption("#y-column", "G (e2/h)");
    await page.selectOption("#y-unit", "e2/h");
    await page.selectOption("#sigma-column", "sigma (e2/h)");
    await page.locator("#dataset-name").fill(name);
    await page.locator("[data-chart=dataset-preview] svg path[data-series=data]").waitFor();
    await expect(page.locator("[data-testid=csv-issues]").count()).resolves.toBe(0);
    await shot("data-upload.png");
    await page.getByRole("button", { name: "Save dataset" }).click();
    await page.waitForURL(/\/datasets\/[0-9a-f-]{36}$/);
    await expect(page.locator("h1").innerText()).resolves.toBe(name);
  });

  it("runs the period analysis and shows the spectrum peak and the twist angle", async () => {
    await page.getByRole("button", { name: "Estimate the moiré period" }).click();
    await page.locator("[data-testid=period-result]").waitFor();
    await page.locator("[data-chart=period-spectrum] svg path[data-series=spectrum]").waitFor();
    await expect(page.locator("[data-chart=period-spectrum] [data-points=peak] circle").count()).resolves.toBe(1);
    // Made at 0.11 degrees (LK07_NETWORK, src/shared/lk07.ts); one flux quantum per triangle.
    const twist = Number((await page.locator("[data-testid=twist-degrees]").innerText()).replace("°", ""));
    expect(Math.abs(twist - 0.11)).toBeLessThan(0.003);
    await expect(page.getByText("one flux quantum per triangle").isVisible()).resolves.toBe(true);
    await shot("data-period.png");
  });

  it("starts a fit and shows the overlay of data and model and the values with uncertainties", async () => {
    await page.locator('[aria-label="fit contactOhms"]').check();
    await page.locator('[aria-label="contactOhms initial"]').fill("300");
    await page.locator('[aria-label="contactOhms max"]').fill("3000");
    await page.locator('[aria-label="node.forward initial"]').fill("0.5");
    await page.locator('[aria-label="node.forward min"]').fill("0.2");
    await page.locator('[aria-label="node.forward max"]').fill("0.9");
    await page.getByRole("button", { name: "Start the fit" }).click();
    await page.waitForURL(/\/fits\/[0-9a-f-]{36}$/);
    await page.locator("[data-status=succeeded]").waitFor({ timeout: 170_000 });
    const overlay = page.locator('[data-chart$="-overlay"]');
    await overlay.locator("svg path[data-series=model]").waitFor();
    await overlay.locator("svg path[data-series='data']").waitFor();
    await page.locator('[data-chart$="-residuals"] svg path[data-series=residual]').waitFor();
    const rows = page.locator("[data-testid=fit-values] tbody tr");
    await expect(rows.count()).resolves.toBe(2);
    const forward = await page.locator('[data-testid=fit-values] tr[data-parameter="node.forward"]').innerText();
    expect(forward).toMatch(/±\s*\d/);
    const value = Number(forward.split(/\s+/)[1]);
    expect(Math.abs(value - 0.55)).toBeLessThan(0.01);
    await expect(page.locator("[data-testid=chi2-per-dof]").innerText()).resolves.toMatch(/^\d/);
    await expect(page.locator("[data-testid=fit-correlation]").isVisible()).resolves.toBe(true);
    await shot("data-fit-report.png");
  }, 200_000);
});
