// Result pages a physicist can read and cite: a conductance calculation with its inputs and
// citation, a DOS scan drawn as DOS(E) per point, and a scan whose points failed, with the reasons
// on the scan's page. Real results made through the API.
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { screenshot, url, useBrowser } from "../support/browser";
import { api } from "../support/services";

const browser = useBrowser();

let page: Page;
const network = {
  lattice: "triangular",
  size: { columns: 6, rows: 4 },
  transverse: "periodic",
  twistDegrees: 0.11,
  node: { forward: 0.4, left: 0.3, right: 0.3 },
  disorder: { linkPhaseWidthRad: 3, forwardSpread: 0, seed: 7 },
};

type Finished = { id: string; status: string; inputHash: string; engineVersion: string; points?: { status: string; error: { message: string } | null }[] };

async function finish(path: "runs" | "sweeps", body: Record<string, unknown>, allowFailed = false): Promise<Finished> {
  const res = await api(`/api/v1/${path}`, { as: "researcher", method: "POST", json: { network, ...body } });
  expect(res.status, await res.clone().text()).toBe(202);
  const { id } = (await res.json()) as { id: string };
  for (let i = 0; i < 240; i++) {
    const r = (await (await api(`/api/v1/${path}/${id}`, { as: "researcher" })).json()) as Finished;
    if (r.status === "succeeded" || (allowFailed && r.status === "failed")) return r;
    if (r.status === "failed" || r.status === "cancelled") throw new Error(`${path} ${id} ${r.status}`);
    await new Promise((ok) => setTimeout(ok, 500));
  }
  throw new Error(`${path} ${id} did not finish`);
}

/** No raw engine key on the page: camelCase names with units glued on (fieldTesla, broadeningMeV, cellAreaNm2, ...). */
async function expectNoRawKeys(p: Page) {
  const text = await p.locator("main").innerText();
  expect(text).not.toMatch(/\b[a-z]+(MeV|Tesla|Nm2?|Ohms|PerCm2|Mps|Rad)\b/);
  expect(text).not.toMatch(/AXISES|axises/i);
}

beforeAll(async () => {
  page = await browser.signedInPage("researcher");
});

describe("result pages by kind, with inputs and a citation", () => {
  it("a conductance calculation: figures with units, its inputs in words, the network and the citation (URL, hash, engine version)", async () => {
    const run = await finish("runs", { computation: { kind: "conductance", energyMeV: 2, fieldTesla: 0.15, temperatureK: 0 } });
    await page.goto(url(`/runs/${run.id}`));
    await page.getByTestId("conductance-figures").waitFor();
    await expect(page.getByTestId("conductance-figures").innerText()).resolves.toMatch(/e²\/h/);
    const inputs = page.getByTestId("inputs-block");
    await inputs.waitFor();
    const inputsText = await inputs.innerText();
    expect(inputsText).toMatch(/Energy E\s+2 meV/);
    expect(inputsText).toMatch(/Magnetic field B\s+0\.15 T/);
    expect(inputsText).toMatch(/Temperature T\s+0 K/);
    expect(inputsText).toMatch(/Twist angle θ\s+0\.11 °/);
    expect(inputsText).toMatch(/Forward probability P_f\s+0\.4/);
    expect(inputsText).toContain("given inline (not a saved network)");
    await expect(page.getByTestId("provenance-hash").innerText()).resolves.toBe(run.inputHash);
    await expect(page.getByTestId("provenance-engine").innerText()).resolves.toBe(run.engineVersion);
    const cite = await page.getByTestId("cite-text").innerText();
    const lines = cite.split("\n");
    expect(lines[0]).toMatch(/^Conductance at E = 2 meV, B = 0\.15 T, T = 0 K\. Larkspur Devices Lab, Triskel, \d{4}-\d{2}-\d{2} \(UTC\)\.$/);
    expect(lines[1]).toBe(url(`/runs/${run.id}`));
    expect(lines[2]).toBe(`Engine version ${run.engineVersion}; input hash (sha256) ${run.inputHash}.`);
    expect(cite).toContain("Model prediction");
    await page.getByTestId("cite-copy").click();
    await expect.poll(() => page.getByTestId("cite-copy").innerText()).toMatch(/Copied|Copy citation/);
    await expectNoRawKeys(page);
    await page.getByTestId("cite-block").scrollIntoViewIfNeeded();
    await screenshot(page, "app-view-conductance-provenance.png");
  });

  it("a DOS scan: DOS(E) of each point with a legend by the axis value in units, a map over the axis and energy, no constant broadening", async () => {
    const s = await finish("sweeps", {
      computation: { kind: "dos", kMesh: 8, energies: { fromMeV: 0, toMeV: 20, points: 40 } },
      axes: [{ parameter: "periodNm", values: [120, 141, 160] }],
    });
    await page.goto(url(`/sweeps/${s.id}`));
    await expect(page.locator("h1").innerText()).resolves.toBe("Density of states versus moiré period (nm)");
    await expect(page.getByText("1 axis · 3 points").count()).resolves.toBe(1);
    const scan = page.getByTestId("dos-scan");
    await expect.poll(() => scan.getAttribute("data-curves"), { timeout: 30_000 }).toBe("3");
    const curves = page.locator('[data-chart="sweep-dos-' + s.id + '"]');
    await expect(curves.locator("[data-series]").count()).resolves.toBe(3);
    await expect(curves.locator("[data-series]").evaluateAll((ps) => ps.map((p) => p.getAttribute("data-series")))).resolves.toEqual([
      "l = 120 nm",
      "l = 141 nm",
      "l = 160 nm",
    ]);
    await expect(curves.locator("[data-label=x]").textContent()).resolves.toBe("Energy E (meV)");
    await expect(curves.locator("[data-label=y]").textContent()).resolves.toBe("Density of states per moiré cell (1/(meV·cell))");
    // Each curve has the 40 energies of its point, not one constant.
    expect(await curves.locator("[data-series]").first().getAttribute("d")).toMatch(/^M[\d.]+,[\d.]+(L[\d.]+,[\d.]+){30,}/);
    const map = page.locator('[data-chart="sweep-dos-map-' + s.id + '"]');
    await expect(map.locator("[data-label=y]").textContent()).resolves.toBe("Moiré period l (nm)");
    await expect(page.getByText("Broadening (meV)").count()).resolves.toBe(0);
    const inputs = await page.getByTestId("inputs-block").innerText();
    expect(inputs).toMatch(/Axis 1\s+Moiré period l \(nm\): 3 values from 120 nm to 160 nm/);
    expect(inputs).toMatch(/k-mesh \(points per direction\)\s+8/);
    await expect(page.getByTestId("provenance-hash").innerText()).resolves.toBe(s.inputHash);
    const cite = await page.getByTestId("cite-text").innerText();
    expect(cite).toContain(url(`/sweeps/${s.id}`));
    expect(cite).toContain(s.inputHash);
    expect(cite).toContain(`Engine version ${s.engineVersion}`);
    await expectNoRawKeys(page);
    await screenshot(page, "app-view-dos-scan.png");
  });

  it("a scan whose points failed: how many and why, grouped by reason, on the scan's page", async () => {
    // The adaptive thermal average is limited to 120 energies here: the hot points need more and
    // fail in the worker (the limit is only known once the computation plans its energies; field
    // steps a torus refuses are refused when the scan is submitted, so they cannot serve here).
    const s = await finish(
      "sweeps",
      { computation: { kind: "conductance", energyMeV: 1, temperatureMaxEnergies: 120 }, axes: [{ parameter: "temperatureK", values: [0, 30, 40] }] },
      true,
    );
    expect(s.status).toBe("failed");
    const failed = (s.points ?? []).filter((p) => p.status === "failed");
    expect(failed.length).toBeGreaterThan(0);
    await page.goto(url(`/sweeps/${s.id}`));
    const box = page.getByTestId("sweep-failures");
    await box.waitFor();
    await expect(box.locator("h2").innerText()).resolves.toMatch(new RegExp(`^${failed.length} of 3 points failed`));
    // One group for one reason at different values, in words: the field named, not the raw key.
    const shown = (await box.getByTestId("sweep-failure-reason").allInnerTexts()).join("\n");
    expect(shown).toMatch(new RegExp(`^${failed.length} points?: Thermal average: most energies per sample: the thermal average needs at least \\d+ energies`));
    expect(shown).toContain("over the limit of 120");
    expect(shown).not.toContain("temperatureMaxEnergies");
    for (const p of failed) expect(p.error!.message).toMatch(/^computation\.temperatureMaxEnergies: the thermal average needs/);
    await expect(box.getByRole("link", { name: /^T = (30|40) K$/ }).count()).resolves.toBe(failed.length);
    await expect(page.getByTestId("sweep-counts").innerText()).resolves.toMatch(new RegExp(`failed`));
    await expectNoRawKeys(page);
    await screenshot(page, "app-view-failed-scan.png");
  });
});
