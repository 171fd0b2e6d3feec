// The scan builder's checks before submitting, in the browser: a scan over node forward from 0.05
// to 0.95 on a node with left:right = 0.375:0.625 is flagged in words with the reachable range and
// fixed with one click; an LDOS scan over field on a periodic sample (a torus) lists the allowed
// field steps and snaps the axis to them; the fixed scan goes through the server's dry run and
// starts. The square-lattice editor shows no moiré, twist or valley controls. Networks are synthetic.
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { fill, screenshot, url, useBrowser } from "../support/browser";
import { seriousViolations } from "../support/axe";
import { api } from "../support/services";

const browser = useBrowser();
let page: Page;
let networkId = "";

beforeAll(async () => {
  const made = await api("/api/v1/networks", {
    as: "researcher",
    method: "POST",
    json: {
      name: `Scan checks e2e ${Date.now().toString(36)} (synthetic)`,
      network: {
        lattice: "triangular",
        size: { columns: 6, rows: 4 },
        transverse: "periodic",
        twistDegrees: 0.11,
        node: { forward: 0.2, left: 0.3, right: 0.5 },
      },
    },
  });
  expect(made.status, await made.clone().text()).toBe(201);
  networkId = (await made.json()).id;
  page = await browser.signedInPage("researcher");
});

const value = (id: string) => page.locator(`[id="${id}"]`).inputValue();

describe("the scan builder checks before submitting", () => {
  it("node forward 0.05 to 0.95: the unreachable values in words, the reachable range, and a button that applies the nearest valid range", async () => {
    await page.goto(url(`/networks/${networkId}#sweep`));
    const form = page.getByRole("form", { name: "Build a scan" });
    await form.waitFor();
    await page.selectOption('[id="axis0.parameter"]', "node.forward");
    await fill(page, "axis0.from", 0.05);
    await fill(page, "axis0.to", 0.95);
    await fill(page, "axis0.points", 11);
    const problem = form.getByTestId("axis0-problem");
    await problem.waitFor();
    const text = await problem.innerText();
    expect(text).toMatch(/Axis 1, forward probability: 2 of 11 values \(0\.05, 0\.95\) are not reachable: no unitary node has them/);
    expect(text).toContain("keeps left and right turning in the network's ratio 0.375 : 0.625");
    expect(text).toContain("must lie between 0.106407 and 0.880681");
    expect(text).not.toMatch(/sqrt\(|network\.node/);
    const start = form.getByRole("button", { name: /^Start scan of 11 points$/ });
    expect(await start.isDisabled()).toBe(true);
    await expect(start.getAttribute("aria-describedby")).resolves.toBe("axis0-problem");
    expect(await seriousViolations(page)).toEqual([]);
    await problem.scrollIntoViewIfNeeded();
    await screenshot(page, "app-scan-check-node-range.png");

    const fix = form.getByTestId("axis0-fix");
    await expect(fix.innerText()).resolves.toBe("Scan from 0.1065 to 0.8806 (11 points)");
    await fix.click();
    await expect.poll(() => problem.count()).toBe(0);
    expect(await value("axis0.from")).toBe("0.1065");
    expect(await value("axis0.to")).toBe("0.8806");
    expect(await value("axis0.points")).toBe("11");
    await expect.poll(() => start.isEnabled()).toBe(true);
    // the server's dry run has the final word, then the scan starts
    await start.click();
    await page.waitForURL(/\/sweeps\/[0-9a-f-]{36}$/, { timeout: 60_000 });
  });

  it("an LDOS scan over field on a periodic sample: the field steps a torus allows, listed near the range, and the axis snapped to them", async () => {
    await page.goto(url(`/networks/${networkId}#sweep`));
    const form = page.getByRole("form", { name: "Build a scan" });
    await form.waitFor();
    await page.selectOption('[id="sweep.kind"]', "ldos");
    await page.selectOption('[id="axis0.parameter"]', "fieldTesla");
    await fill(page, "axis0.from", 0);
    await fill(page, "axis0.to", 1);
    await fill(page, "axis0.points", 6);
    const problem = form.getByTestId("axis0-problem");
    await problem.waitFor();
    await expect(problem.getAttribute("data-reason")).resolves.toBe("torusField");
    const text = await problem.innerText();
    expect(text).toMatch(/5 of 6 values \(0\.2 T, 0\.4 T, 0\.6 T, 0\.8 T, 1 T\) are not allowed/);
    expect(text).toMatch(/a local density of states map runs on the closed periodic sample \(a torus\), which holds a whole number of flux quanta h\/e/);
    const step = Number(/must be a multiple of ([\d.e-]+) T for this 6 × 4 sample/.exec(text)![1]);
    expect(step).toBeGreaterThan(0);
    // the allowed fields nearest the ends: 0 T, and the two multiples around 1 T
    const allowed = (await form.getByTestId("axis0-allowed").innerText()).match(/[\d.e-]+(?= T)/g)!.map(Number);
    expect(allowed).toHaveLength(3);
    expect(allowed[0]).toBe(0);
    expect(allowed[1]).toBeLessThan(1);
    expect(allowed[2]).toBeGreaterThan(1);
    expect(allowed[2] - allowed[1]).toBeCloseTo(step, 4);
    expect(await form.getByRole("button", { name: /^Start scan of 6 points$/ }).isDisabled()).toBe(true);
    await problem.scrollIntoViewIfNeeded();
    await screenshot(page, "app-scan-check-torus-field.png");

    await form.getByTestId("axis0-fix").click();
    await expect.poll(() => problem.count()).toBe(0);
    expect(Number(await value("axis0.from"))).toBe(0);
    const to = Number(await value("axis0.to"));
    expect(to).toBeLessThanOrEqual(1 + step / 2);
    expect(to).toBeGreaterThan(1 - 6 * step);
    // every point of the snapped axis is a whole number of steps
    for (let i = 0; i < 6; i++) {
      const quanta = (to * i) / 5 / step;
      expect(Math.abs(quanta - Math.round(quanta))).toBeLessThan(1e-3);
    }
    await expect.poll(() => form.getByRole("button", { name: /^Start scan of 6 points$/ }).isEnabled()).toBe(true);
  });
});

describe("the network editor shows only the fields of its lattice", () => {
  it("the square lattice has a link length and no twist angle, moiré period, channels or valley controls; switching back keeps the size", async () => {
    await page.goto(url("/networks/new"));
    const form = page.getByRole("form", { name: "Network description" });
    await form.waitFor();
    await fill(page, "size.columns", 10);
    await expect(form.getByRole("radiogroup", { name: "Scale given as" }).count()).resolves.toBe(1);
    await expect(page.locator('[id="degeneracy.valley"]').count()).resolves.toBe(1);
    await expect(page.getByRole("radiogroup", { name: "Valley drawn" }).count()).resolves.toBe(1);

    await page.selectOption("#lattice", "square");
    await page.locator('[id="node.turning"]').waitFor();
    const words = await form.innerText();
    expect(words).not.toMatch(/moiré|Twist angle|Valley degeneracy|Channels per link/i);
    await expect(form.getByRole("radiogroup", { name: "Scale given as" }).count()).resolves.toBe(0);
    for (const id of ["twistDegrees", "degeneracy.valley", "channelsPerLink", "node.forward"])
      await expect(page.locator(`[id="${id}"]`).count(), id).resolves.toBe(0);
    await expect(page.getByRole("radiogroup", { name: "Valley drawn" }).count()).resolves.toBe(0);
    await expect(page.locator('label[for="periodNm"]').innerText()).resolves.toMatch(/^Link length l/);
    // the link length comes from the triangular network's twist (0.11 degrees: about 128 nm); the size is kept
    expect(Number(await value("periodNm"))).toBeCloseTo(128.1, 0);
    expect(await value("size.columns")).toBe("10");
    await expect(page.getByRole("button", { name: "Create network" }).isDisabled()).resolves.toBe(true); // no name yet
    await screenshot(page, "app-editor-square-fields.png");

    await page.selectOption("#lattice", "triangular");
    await page.locator('[id="node.forward"]').waitFor();
    await expect(form.getByRole("radiogroup", { name: "Scale given as" }).count()).resolves.toBe(1);
    await expect(page.locator('[id="degeneracy.valley"]').count()).resolves.toBe(1);
    expect(await value("size.columns")).toBe("10");
  });
});
