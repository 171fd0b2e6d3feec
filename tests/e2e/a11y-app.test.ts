// Accessibility of the main pages: axe-core injected into the page (tests/support/axe.ts); no
// serious or critical violations.
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { seriousViolations } from "../support/axe";
import { url, useBrowser } from "../support/browser";
import { api } from "../support/services";

const browser = useBrowser();

let page: Page;
beforeAll(async () => {
  page = await browser.signedInPage("researcher");
});

describe("accessibility of the web app", () => {
  const pages: [string, string | (() => Promise<string>), string][] = [
    ["networks list", "/networks", "h1"],
    ["network editor", "/networks/new", "svg[data-renderer]"],
    ["calculations list", "/runs", "h1"],
    ["scans list", "/sweeps", "h1"],
    ["group", "/workspace", "h1"],
    ["model manual", "/manual", ".katex"],
    ["from a script", "/manual/scripts", "figure[data-example] code"],
    ["API reference", "/manual/api", "h3#postRuns"],
    [
      "saved network with calculation and scan forms",
      async () => {
        const list = (await (await api("/api/v1/networks?limit=1", { as: "researcher" })).json()) as { networks: { id: string }[] };
        return `/networks/${list.networks[0].id}`;
      },
      "form[aria-label='Build a scan']",
    ],
    [
      "finished conductance calculation with its figures",
      async () => {
        const list = (await (await api("/api/v1/networks?limit=50", { as: "researcher" })).json()) as { networks: { id: string; name: string }[] };
        const networkId = list.networks.find((n) => n.name.startsWith("Clean"))!.id;
        const res = await api("/api/v1/runs", { as: "researcher", method: "POST", json: { networkId, computation: { kind: "conductance", energyMeV: 2 } } });
        const { id } = (await res.json()) as { id: string };
        for (let i = 0; i < 240; i++) {
          const r = (await (await api(`/api/v1/runs/${id}`, { as: "researcher" })).json()) as { status: string };
          if (r.status === "succeeded") break;
          await new Promise((ok) => setTimeout(ok, 500));
        }
        return `/runs/${id}`;
      },
      '[data-chart="transmission-eigenvalues"] [data-layer=bars] rect',
    ],
    [
      "scan page",
      async () => {
        const list = (await (await api("/api/v1/sweeps?limit=1", { as: "researcher" })).json()) as { sweeps: { id: string }[] };
        return `/sweeps/${list.sweeps[0].id}`;
      },
      "[data-testid=progress]",
    ],
  ];
  for (const [label, path, ready] of pages) {
    it(`has no serious violations: ${label}`, async () => {
      const target = typeof path === "string" ? path : await path();
      await page.goto(url(target));
      await page.locator(ready).first().waitFor();
      await page.waitForTimeout(300);
      const found = await seriousViolations(page);
      expect(found).toEqual([]);
    });
  }
  it("has no serious violations in the dark theme either", async () => {
    await page.goto(url("/networks/new"));
    await page.locator("svg[data-renderer]").waitFor();
    await page.evaluate(() => document.documentElement.classList.add("dark"));
    await page.waitForTimeout(200);
    expect(await seriousViolations(page)).toEqual([]);
  });
});
