// Charts a physicist can trust, on real results computed through the API: the band plot against
// k along the path in nm^-1 with the zone points where physics.md section 6 puts them and both
// valleys; the LDOS colour bar of a clean network (uniform to within 1 %: drawn from 0, not
// stretched unless asked); axes whose tick labels (powers of ten, SI prefixes) stay inside the
// SVG and clear of the titles; the network drawing's lead channels in both directions and
// arrowheads of constant size under zoom. Screenshots in light and dark theme.
import { beforeAll, describe, expect, it } from "vitest";
import type { Locator, Page } from "playwright-core";
import { screenshot, url, useBrowser } from "../support/browser";
import { api } from "../support/services";
import { contrastRatio, MIN_DATA_CONTRAST } from "@/components/charts/colorScale";

const browser = useBrowser();

let page: Page;
const twistDegrees = 0.11;
/** Moiré period l = a / (2 sin(theta / 2)), a = 0.246 nm (physics.md section 4). */
const periodNm = 0.246 / (2 * Math.sin(((twistDegrees / 2) * Math.PI) / 180));
const disordered = {
  lattice: "triangular",
  size: { columns: 6, rows: 4 },
  transverse: "periodic",
  twistDegrees,
  node: { forward: 0.4, left: 0.3, right: 0.3 },
  disorder: { linkPhaseWidthRad: 3, forwardSpread: 0, seed: 7 },
};
/** No disorder: every link of the torus is alike up to direction, and a 3 meV broadening smooths the levels (spread about 0.1 %). */
const clean = { lattice: "triangular", size: { columns: 8, rows: 8 }, transverse: "periodic", twistDegrees, node: { forward: 0.4, left: 0.3, right: 0.3 } };

async function finished(kind: string, body: Record<string, unknown>): Promise<string> {
  const res = await api(`/api/v1/runs`, { as: "researcher", method: "POST", json: body });
  expect(res.status, `${kind}: ${await res.clone().text()}`).toBe(202);
  const { id } = (await res.json()) as { id: string };
  for (let i = 0; i < 240; i++) {
    const r = (await (await api(`/api/v1/runs/${id}`, { as: "researcher" })).json()) as { status: string; error?: unknown };
    if (r.status === "succeeded") return id;
    if (r.status === "failed" || r.status === "cancelled") throw new Error(`${kind} ${r.status}: ${JSON.stringify(r.error)}`);
    await new Promise((ok) => setTimeout(ok, 500));
  }
  throw new Error(`${kind} did not finish`);
}

/** Opens a page in the given colour scheme (the charts read the theme's colours when they mount). */
async function open(path: string, scheme: "light" | "dark") {
  await page.emulateMedia({ colorScheme: scheme });
  await page.goto(url(path));
}

/**
 * Boxes (screen coordinates) of a chart's SVG, its tick labels per axis and its axis titles:
 * every label must lie inside the SVG, no two tick labels of an axis overlap, and no tick label
 * overlaps an axis title.
 */
async function layoutProblems(chart: Locator): Promise<string[]> {
  return chart
    .locator("svg")
    .first()
    .evaluate((svg) => {
      type Box = { l: number; r: number; t: number; b: number; text: string };
      const box = (e: Element): Box => {
        const r = e.getBoundingClientRect();
        return { l: r.left, r: r.right, t: r.top, b: r.bottom, text: e.textContent ?? "" };
      };
      const overlap = (a: Box, b: Box) => a.l < b.r - 0.5 && b.l < a.r - 0.5 && a.t < b.b - 0.5 && b.t < a.b - 0.5;
      const s = box(svg);
      const problems: string[] = [];
      const ticks = (axis: string) => [...svg.querySelectorAll(`[data-axis=${axis}] .tick text`)].map(box);
      const titles = [...svg.querySelectorAll("[data-label]")].map(box);
      for (const b of [...ticks("x"), ...ticks("y"), ...titles])
        if (b.l < s.l - 0.5 || b.r > s.r + 0.5 || b.t < s.t - 0.5 || b.b > s.b + 0.5) problems.push(`"${b.text}" leaves the SVG`);
      for (const axis of ["x", "y"]) {
        const t = ticks(axis);
        for (let i = 0; i < t.length; i++) {
          for (let j = i + 1; j < t.length; j++) if (overlap(t[i], t[j])) problems.push(`ticks "${t[i].text}" and "${t[j].text}" overlap`);
          for (const title of titles) if (overlap(t[i], title)) problems.push(`tick "${t[i].text}" overlaps the title "${title.text}"`);
        }
      }
      if (ticks("x").length < 2 || ticks("y").length < 2) problems.push("fewer than two ticks on an axis");
      return problems;
    });
}

beforeAll(async () => {
  page = await browser.signedInPage("researcher");
});

describe("band plot", () => {
  it("draws both valleys against k along the path in nm⁻¹, with the zone points at their distances and a valley toggle", async () => {
    const id = await finished("spectrum", { network: disordered, computation: { kind: "spectrum", pathPointsPerSegment: 12 } });
    for (const scheme of ["light", "dark"] as const) {
      await open(`/runs/${id}`, scheme);
      const chart = page.locator('[data-chart="band-structure"]');
      await chart.locator("[data-valley=K] circle").first().waitFor();
      await expect(chart.locator("[data-label=x]").textContent()).resolves.toBe("Distance along the path in k-space (nm⁻¹)");
      await expect(chart.locator("[data-label=y]").textContent()).resolves.toBe("Energy (meV)");
      // Numeric ticks along the path: plain numbers, increasing, all different.
      const xTicks = await chart.locator("[data-axis=x] .tick text").allTextContents();
      expect(xTicks.length).toBeGreaterThanOrEqual(3);
      for (const t of xTicks) expect(t).toMatch(/^\d+(\.\d+)?$/);
      const values = xTicks.map(Number);
      for (let i = 1; i < values.length; i++) expect(values[i]).toBeGreaterThan(values[i - 1]);
      // Zone points: Γ-K is |K| = 4π/(3l), K-M is 2π/(3l), M-Γ is |M| = 2π/(√3 l) (physics.md section 6).
      await expect(chart.locator("[data-layer=zone-points] text").allTextContents()).resolves.toEqual(["Γ", "K", "M", "Γ"]);
      const at = (await chart.locator("[data-point]").evaluateAll((gs) => gs.map((g) => Number(g.getAttribute("data-k"))))) as number[];
      const K = (4 * Math.PI) / (3 * periodNm);
      const expected = [0, K, K + (2 * Math.PI) / (3 * periodNm), K + (2 * Math.PI) / (3 * periodNm) + (2 * Math.PI) / (Math.sqrt(3) * periodNm)];
      at.forEach((v, i) => expect(v).toBeCloseTo(expected[i], 9));
      // The guide lines sit where the numeric axis puts those values (ticks are translate(x,0)).
      const tickX = await chart
        .locator("[data-axis=x] .tick")
        .evaluateAll((ts) => ts.map((t) => Number(/translate\(([-\d.e]+)/.exec(t.getAttribute("transform") ?? "")?.[1])));
      const pxPerNm = (tickX[tickX.length - 1] - tickX[0]) / (values[values.length - 1] - values[0]);
      const guideX = await chart.locator("[data-point] line").evaluateAll((ls) => ls.map((l) => Number(l.getAttribute("x1"))));
      guideX.forEach((x, i) => expect(Math.abs(tickX[0] + (expected[i] - values[0]) * pxPerNm - x)).toBeLessThan(1));
      // Legend: one entry per valley, naming its marker.
      await expect(chart.locator("[data-legend=K] text").textContent()).resolves.toBe("valley K (filled dots)");
      await expect(chart.locator(`[data-legend="K'"] text`).textContent()).resolves.toBe("valley K′ (open rings)");
      const count = async () => ({ K: await chart.locator("[data-valley=K] circle").count(), Kp: await chart.locator(`[data-valley="K'"] circle`).count() });
      const both = await count();
      expect(both.K).toBeGreaterThan(20);
      expect(both.Kp).toBe(both.K);
      await screenshot(page, `app-chart-bands-${scheme}.png`);
      if (scheme === "dark") continue;
      const toggle = chart.getByTestId("valley-toggle");
      await toggle.getByRole("button", { name: "K", exact: true }).click();
      await expect.poll(count).toEqual({ K: both.K, Kp: 0 });
      await expect(chart.locator(`[data-legend="K'"] text`).textContent()).resolves.toBe("valley K′ (open rings), hidden");
      await toggle.getByRole("button", { name: "K′", exact: true }).click();
      await expect.poll(count).toEqual({ K: 0, Kp: both.Kp });
      await toggle.getByRole("button", { name: "Both valleys" }).click();
      await expect.poll(count).toEqual(both);
    }
  });
});

describe("LDOS colour bar", () => {
  it("draws a clean network's uniform map from 0, says it is uniform, labels both ends apart and stretches only on request", async () => {
    const id = await finished("ldos", { network: clean, computation: { kind: "ldos", energyMeV: 4, broadeningMeV: 3 } });
    for (const scheme of ["light", "dark"] as const) {
      await open(`/runs/${id}`, scheme);
      const legend = page.getByTestId("ldos-legend");
      const note = page.getByTestId("colour-scale-note");
      await note.waitFor();
      await expect(note.getAttribute("data-uniform")).resolves.toBe("true");
      await expect(note.getAttribute("data-mode")).resolves.toBe("absolute");
      await expect(note.innerText()).resolves.toMatch(
        /^Absolute: 0 to 0\.11\d+ states\/meV\. The map is uniform to within 0\.\d+ % \(min 0\.11\d+, max 0\.11\d+ states\/meV\)\./,
      );
      const ends = async () => [await legend.locator("[data-end=low]").textContent(), await legend.locator("[data-end=high]").textContent()];
      const [low, high] = await ends();
      expect(low).toBe("0");
      expect(high).toMatch(/^0\.11\d\d$/);
      // On the absolute scale the links of a uniform map share (nearly) one colour.
      const drawing = page.locator("svg[data-renderer=svg]");
      const strokes = () => drawing.locator("line.tk-link").evaluateAll((ls) => ls.map((l) => l.getAttribute("stroke") ?? ""));
      expect(new Set(await strokes()).size).toBeLessThanOrEqual(3);
      await screenshot(page, `app-chart-ldos-uniform-${scheme}.png`);
      // Stretched: the note says so in words; the ends still read differently.
      await page.getByTestId("colour-scale-toggle").click();
      await expect.poll(() => note.getAttribute("data-mode")).toBe("relative");
      await expect(note.innerText()).resolves.toMatch(
        /^Stretched: the 0\.\d+ % spread \(min 0\.11\d+, max 0\.11\d+ states\/meV\) fills the whole colour range/,
      );
      const [sLow, sHigh] = await ends();
      expect(sLow).not.toBe(sHigh);
      expect(sLow).toMatch(/^0\.11\d+$/);
      // No link colour, the lowest included, comes near the drawing's background in this theme.
      const background = await drawing.evaluate((svg) => getComputedStyle(svg.closest("figure")!).backgroundColor);
      const colours = new Set(await strokes());
      expect(colours.size).toBeGreaterThan(1);
      for (const c of colours) expect(contrastRatio(c, background)).toBeGreaterThanOrEqual(MIN_DATA_CONTRAST);
      await screenshot(page, `app-chart-ldos-stretched-${scheme}.png`);
      await page.getByTestId("colour-scale-toggle").click();
      await expect.poll(() => note.getAttribute("data-mode")).toBe("absolute");
    }
  });
});

describe("axes with large values", () => {
  it("writes carrier densities as powers of ten and keeps every label inside the chart, clear of the titles", async () => {
    const id = await finished("dos", { network: disordered, computation: { kind: "dos", kMesh: 12, energies: { fromMeV: 0, toMeV: 30, points: 60 } } });
    for (const scheme of ["light", "dark"] as const) {
      await open(`/runs/${id}`, scheme);
      const n = page.locator('[data-chart="carrier-density"]');
      await n.locator("[data-series]").waitFor();
      const labels = await n.locator("[data-axis=y] .tick text").allTextContents();
      for (const l of labels) {
        expect(l).not.toMatch(/,/);
        expect(l).toMatch(/^(0|−?\d+(\.\d+)?·10[⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)$/);
      }
      expect(labels.some((l) => l.includes("·10"))).toBe(true);
      await expect(layoutProblems(n)).resolves.toEqual([]);
      await expect(layoutProblems(page.locator('[data-chart="density-of-states"]'))).resolves.toEqual([]);
      await screenshot(page, `app-chart-density-${scheme}.png`);
    }
  });

  it("previews a resistance up to 1 GΩ with SI prefixes and no label over the axis title", async () => {
    const rows = Array.from({ length: 41 }, (_, i) => {
      const b = -2 + i * 0.1;
      return `${b.toFixed(2)},${(1e3 * 10 ** (6 * Math.exp(-b * b))).toPrecision(8)}`;
    });
    const csv = ["# synthetic resistance curve for the axis test", "B_T,R_ohm", ...rows].join("\n");
    await open("/datasets/new", "light");
    await page.getByRole("heading", { name: "Upload a measured curve" }).waitFor();
    const dt = await page.evaluateHandle((text) => {
      const d = new DataTransfer();
      d.items.add(new File([text], "resistance.csv", { type: "text/csv" }));
      return d;
    }, csv);
    await page.dispatchEvent("[data-testid=drop-zone]", "drop", { dataTransfer: dt });
    await page.locator("#y-measures").waitFor();
    await page.selectOption("#y-measures", "longitudinal");
    const chart = page.locator("[data-chart=dataset-preview]");
    await chart.locator("svg path[data-series=data]").waitFor();
    const labels = await chart.locator("[data-axis=y] .tick text").allTextContents();
    expect(labels.some((l) => / GΩ$/.test(l))).toBe(true);
    for (const l of labels) expect(l).toMatch(/^(0|\d+(\.\d+)? [kMG]?Ω)$/);
    await expect(layoutProblems(chart)).resolves.toEqual([]);
    await chart.scrollIntoViewIfNeeded();
    await screenshot(page, "app-chart-dataset-preview-ohm.png");
  });
});

describe("network drawing", () => {
  it("draws every lead's channels in both directions and keeps arrowheads the same size on screen when zoomed", async () => {
    await open("/networks/new", "light");
    const drawing = page.locator("svg[data-renderer=svg]");
    await drawing.waitFor();
    for (const side of ["left", "right"])
      for (const dir of ["in", "out"])
        expect(await drawing.locator(`[data-side=${side}][data-lead-channel=${dir}]`).count(), `${side} ${dir}`).toBeGreaterThan(0);
    const arrow = async () => ({
      px: Number(await drawing.getAttribute("data-arrow-px")),
      zoom: Number(await drawing.getAttribute("data-zoom")),
      marker: Number(await drawing.locator("marker#tk-arrow").getAttribute("markerWidth")),
    });
    const before = await arrow();
    expect(before.zoom).toBe(1);
    await drawing.scrollIntoViewIfNeeded();
    const box = (await drawing.boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    for (let i = 0; i < 8; i++) await page.mouse.wheel(0, -400);
    await expect.poll(async () => (await arrow()).zoom).toBeGreaterThan(4);
    const after = await arrow();
    // On screen: the marker's size in the zoomed group's units times the zoom.
    expect(after.marker * after.zoom).toBeCloseTo(after.px, 3);
    expect(after.px).toBeLessThanOrEqual(9);
    expect(after.marker * after.zoom).toBeLessThanOrEqual(Math.max(9, before.marker * before.zoom));
    await screenshot(page, "app-chart-drawing-zoomed.png", { fullPage: false });
  });
});
