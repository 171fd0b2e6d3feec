// The researcher's main flow in the browser, as a new user would walk it: sign in (landing in the lab), create a
// network and see it drawn, fix a refused node triple by following the message, run a
// conductance and watch it finish with its plot, run a two-axis scan and watch the heat map
// fill in, export CSV. Screenshots go to tests/e2e/screenshots/.
import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { fill, screenshot, url, useBrowser } from "../support/browser";

const browser = useBrowser();

let page: Page;
let networkUrl = "";
const name = `Flow network ${Date.now().toString(36)}`;

beforeAll(async () => {
  page = await browser.signedInPage("researcher", { throughForm: true });
});

const shot = (file: string) => screenshot(page, file);

describe("web app main flow", () => {
  it("shows the signed-in shell in the lab (a lab member starts there), and shows the navigation for the role", async () => {
    await page.goto(url("/networks"));
    await expect(page.locator("h1").innerText()).resolves.toBe("Networks");
    // A lab member's sign-in lands in the lab, not in the empty personal group.
    const groups = page.getByTestId("group-selector");
    await groups.waitFor();
    await expect(groups.getByRole("button", { name: "Larkspur Devices Lab" }).getAttribute("aria-pressed")).resolves.toBe("true");
    await expect.poll(() => page.locator("aside").innerText(), { timeout: 30_000 }).toContain("Lab plan");
    const nav = page.getByRole("navigation", { name: "Main" });
    for (const label of ["Networks", "Calculations", "Scans", "Datasets", "Fits", "Group"]) {
      await expect.poll(() => nav.getByRole("link", { name: new RegExp(`^${label}`) }).count()).toBe(1);
    }
    await expect.poll(() => page.locator("aside").innerText()).toMatch(/Mei Lindqvist\s*Researcher/i);
    // A researcher does not manage billing: the link is hidden (the server refuses regardless).
    await expect(nav.getByRole("link", { name: /^Billing/ }).count()).resolves.toBe(0);
    await expect.poll(() => page.getByRole("link", { name: "Clean 0.11° triangular network" }).count()).toBe(1);
    await shot("app-networks.png");
  });

  it("creates a network, draws it as you type and explains a refused node triple", async () => {
    await page.getByRole("link", { name: "New network" }).click();
    await page.waitForURL(/\/networks\/new$/);
    await fill(page, "name", name);
    // The drawing: 12 x 8 nodes, three links out of each, arrowheads, two leads.
    const drawing = page.locator("svg[data-renderer=svg]");
    await drawing.waitFor();
    await expect(drawing.getAttribute("data-links")).resolves.toBe("288");
    await expect(drawing.locator("line.tk-link").count()).resolves.toBe(288);
    await expect(drawing.locator("circle.tk-node").count()).resolves.toBe(96);
    await expect(drawing.locator("rect[data-lead]").count()).resolves.toBe(2);
    await expect(drawing.locator("line.tk-link[marker-end]").count()).resolves.toBe(288);
    // Twist angle to period, converted live.
    await expect(page.getByTestId("scale-conversion").innerText()).resolves.toContain("128.1 nm");
    // Typing redraws: 16 columns now.
    await fill(page, "size.columns", 16);
    await expect.poll(() => drawing.locator("line.tk-link").count()).toBe(3 * 16 * 8);

    // A triple outside the reachable region is refused, with the reason and the allowed range.
    await fill(page, "node.forward", 0.05);
    await fill(page, "node.left", 0.475);
    await fill(page, "node.right", 0.475);
    const refusal = page.getByTestId("node-refusal");
    await refusal.waitFor();
    const message = await refusal.innerText();
    expect(message).toContain("cannot close a triangle");
    expect(message).toMatch(/forward must lie between 0\.111 and 1\.000/);
    await expect(page.getByTestId("ternary").getAttribute("data-reachable")).resolves.toBe("no");
    await expect(page.getByRole("button", { name: "Create network" }).isDisabled()).resolves.toBe(true);
    await shot("app-network-refused.png");

    // Follow the message: forward at least 1/9 with equal turning.
    await fill(page, "node.forward", 0.2);
    await fill(page, "node.left", 0.4);
    await fill(page, "node.right", 0.4);
    await expect.poll(() => refusal.count()).toBe(0);
    await expect(page.getByTestId("ternary").getAttribute("data-reachable")).resolves.toBe("yes");
    await page.getByRole("button", { name: "Create network" }).click();
    await page.waitForURL(/\/networks\/[0-9a-f-]{36}$/);
    networkUrl = page.url();
    await expect(page.locator("h1").innerText()).resolves.toBe(name);
    await expect.poll(() => page.locator("svg[data-renderer=svg] line.tk-link").count()).toBe(384);
    await shot("app-network.png");
  });

  it("calculates a conductance with the estimate shown first, then shows progress and the plot", async () => {
    const form = page.getByRole("form", { name: "Start a calculation" });
    await expect(form.getByTestId("estimate").innerText()).resolves.toMatch(/Estimate: [\d.]+ compute-(seconds|minutes)/);
    await fill(page, "run.energyMeV", 3);
    await fill(page, "run.fieldTesla", 0.5);
    await form.getByRole("button", { name: "Run conductance" }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.getByRole("progressbar", { name: "Calculation progress" }).waitFor();
    await expect(page.getByTestId("elapsed").count()).resolves.toBe(1);
    await page.locator('[data-status="succeeded"]').waitFor({ timeout: 90_000 });
    await expect(page.getByRole("progressbar", { name: "Calculation progress" }).getAttribute("aria-valuenow")).resolves.toBe("100");
    const figures = await page.getByTestId("conductance-figures").innerText();
    expect(figures).toMatch(/Total conductance G\s+[\d.]+(e-?\d+)? e²\/h/);
    expect(figures).toMatch(/ S/);
    const hist = page.locator('[data-chart="transmission-eigenvalues"]');
    await hist.waitFor();
    expect(await hist.locator("[data-layer=bars] rect").count()).toBe(20);
    await expect(hist.locator("[data-label=x]").textContent()).resolves.toContain("Transmission eigenvalue");
    // Hover read-out.
    const box = (await hist.locator("[data-layer=bars] rect").last().boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + Math.max(1, box.height) - 1);
    await expect.poll(() => hist.getByTestId("readout").innerText()).toMatch(/eigenvalue/);
    await shot("app-run.png");
  });

  it("runs a two-axis scan, draws the heat map as points arrive, and exports CSV", async () => {
    await page.goto(networkUrl + "#sweep");
    const form = page.getByRole("form", { name: "Build a scan" });
    await form.waitFor();
    await page.selectOption('[id="axis0.parameter"]', "fieldTesla");
    await fill(page, "axis0.from", 0);
    await fill(page, "axis0.to", 1.5);
    await fill(page, "axis0.points", 4);
    await form.getByRole("button", { name: "+ Second axis (heat map)" }).click();
    await page.selectOption('[id="axis1.parameter"]', "energyMeV");
    await fill(page, "axis1.from", 0);
    await fill(page, "axis1.to", 10);
    await fill(page, "axis1.points", 5);
    // An ensemble of disorder seeds per point, so the sweep runs long enough to watch it fill in.
    await fill(page, "sweep.ensemble", 250);
    await expect(form.getByTestId("point-count").innerText()).resolves.toMatch(/^20 points × 250 seeds/);
    await expect(form.getByTestId("estimate").innerText()).resolves.toMatch(/Estimate: [\d.]+ compute-(seconds|minutes)[\s\S]*For all 20 points/);
    await form.getByRole("button", { name: "Start scan of 20 points" }).click();
    await page.waitForURL(/\/sweeps\/[0-9a-f-]{36}$/);
    const sweepUrl = page.url();
    await page.getByRole("progressbar", { name: "Scan progress" }).waitFor();
    const plot = page.getByTestId("sweep-plot");
    // Partial results: cells fill in while the sweep runs; the map always has all 20 cells.
    const cells = plot.locator("[data-layer=cells] rect");
    await expect.poll(() => cells.count(), { timeout: 60_000 }).toBe(20);
    const seen: number[] = [];
    let partialShot = false;
    await expect
      .poll(
        async () => {
          const n = await plot.locator('[data-layer=cells] rect[data-filled="yes"]').count();
          seen.push(n);
          if (n > 0 && n < 20 && !partialShot) {
            partialShot = true;
            await shot("app-sweep-partial.png");
          }
          return n;
        },
        { timeout: 180_000, interval: 200 },
      )
      .toBe(20);
    // The map filled in point by point: some states in between were drawn, never fewer cells later.
    expect(seen.some((n) => n > 0 && n < 20)).toBe(true);
    expect(seen.every((n, i) => i === 0 || n >= seen[i - 1])).toBe(true);
    await page.locator('[data-status="succeeded"]').first().waitFor({ timeout: 30_000 });
    await expect(plot.locator("[data-layer=colorbar] rect").count()).resolves.toBeGreaterThan(0);
    await expect(plot.locator("[data-label=x]").textContent()).resolves.toBe("Energy E (meV)");
    await expect(plot.locator("[data-label=y]").textContent()).resolves.toBe("Magnetic field B (T)");
    await shot("app-sweep.png");

    // CSV export of the sweep (the API's file) and of the figure.
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("sweep-csv").click()]);
    const csv = readFileSync((await download.path())!, "utf8");
    const dataLines = csv.split("\n").filter((l) => l && !l.startsWith("#"));
    expect(dataLines[0].split(",").slice(0, 3)).toEqual(["point_index", "field_T", "energy_meV"]);
    expect(csv).toMatch(/^# engine version: [\w.+-]+; input hash \(sha256\): [0-9a-f]{64}$/m);
    expect(dataLines.length).toBe(21);
    const [figure] = await Promise.all([page.waitForEvent("download"), plot.getByRole("button", { name: "CSV" }).click()]);
    const figureCsv = readFileSync((await figure.path())!, "utf8");
    expect(figureCsv).toContain("field_T,energy_meV,");
    expect(figureCsv.split("\n").filter((l) => l && !l.startsWith("#")).length).toBe(21);
    const [svg] = await Promise.all([page.waitForEvent("download"), plot.getByRole("button", { name: "SVG" }).click()]);
    const svgText = readFileSync((await svg.path())!, "utf8");
    expect(svgText).toMatch(/^<svg/);
    expect(svgText).not.toContain("var(--tk");
    expect(sweepUrl).toContain("/sweeps/");
  });
});
