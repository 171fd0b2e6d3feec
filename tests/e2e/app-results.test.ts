// Every computation's result page draws its figure with axes in physical units: band structure,
// density of states and carrier density, local density of states on the network with its colour
// legend, localization, and a one-axis sweep with its ensemble error band.
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

async function finished(kind: string, path: "runs" | "sweeps", body: Record<string, unknown>): Promise<string> {
  const res = await api(`/api/v1/${path}`, { as: "researcher", method: "POST", json: { network, ...body } });
  expect(res.status, `${kind}: ${await res.clone().text()}`).toBe(202);
  const { id } = (await res.json()) as { id: string };
  for (let i = 0; i < 240; i++) {
    const r = (await (await api(`/api/v1/${path}/${id}`, { as: "researcher" })).json()) as { status: string; error?: unknown };
    if (r.status === "succeeded") return id;
    if (r.status === "failed" || r.status === "cancelled") throw new Error(`${kind} ${r.status}: ${JSON.stringify(r.error)}`);
    await new Promise((ok) => setTimeout(ok, 500));
  }
  throw new Error(`${kind} did not finish`);
}

beforeAll(async () => {
  page = await browser.signedInPage("researcher");
});

describe("result figures", () => {
  it("band structure along the path with its high-symmetry points", async () => {
    const id = await finished("spectrum", "runs", { computation: { kind: "spectrum", pathPointsPerSegment: 8 } });
    await page.goto(url(`/runs/${id}`));
    const chart = page.locator('[data-chart="band-structure"]');
    await chart.waitFor();
    expect(await chart.locator("[data-valley] circle").count()).toBeGreaterThan(20);
    await expect(chart.locator("[data-label=y]").textContent()).resolves.toBe("Energy (meV)");
    await expect(chart.locator("[data-layer=zone-points] text").allTextContents()).resolves.toEqual(["Γ", "K", "M", "Γ"]);
    await screenshot(page, "app-result-bands.png");
  });

  it("density of states and carrier density against energy", async () => {
    const id = await finished("dos", "runs", { computation: { kind: "dos", kMesh: 12, energies: { fromMeV: 0, toMeV: 30, points: 60 } } });
    await page.goto(url(`/runs/${id}`));
    const dos = page.locator('[data-chart="density-of-states"]');
    await dos.waitFor();
    await expect(dos.locator("[data-label=x]").textContent()).resolves.toBe("Energy E (meV)");
    await expect(dos.locator("[data-label=y]").textContent()).resolves.toBe("Density of states per moiré cell (1/(meV·cell))");
    expect(await dos.locator("[data-series]").getAttribute("d")).toMatch(/^M[\d.]+,[\d.]+(L[\d.]+,[\d.]+){20,}/);
    const n = page.locator('[data-chart="carrier-density"]');
    await expect(n.locator("[data-label=y]").textContent()).resolves.toMatch(/Carrier density n \(cm⁻²\)/);
    await screenshot(page, "app-result-dos.png");
  });

  it("local density of states drawn on the network with a colour legend", async () => {
    const id = await finished("ldos", "runs", { computation: { kind: "ldos", energyMeV: 4 } });
    await page.goto(url(`/runs/${id}`));
    const drawing = page.locator("svg[data-renderer=svg]");
    await drawing.waitFor();
    const colours = await drawing.locator("line.tk-link").evaluateAll((ls) => new Set(ls.map((l) => l.getAttribute("stroke"))).size);
    expect(colours).toBeGreaterThan(5);
    await expect(page.getByTestId("ldos-legend").innerText()).resolves.toMatch(/LDOS per link \(states \/ meV\)/);
    await screenshot(page, "app-result-ldos.png");
  });

  it("localization length and ln T against strip length", async () => {
    const id = await finished("localization", "runs", { computation: { kind: "localization", energyMeV: 2, ensemble: { samples: 2 } } });
    await page.goto(url(`/runs/${id}`));
    await page.getByText("Λ = ξ / W", { exact: true }).waitFor();
    await expect(page.getByText(/Localization length ξ/).count()).resolves.toBe(1);
    const chart = page.locator('[data-chart="localization"]');
    await chart.waitFor();
    await expect(chart.locator("[data-label=x]").textContent()).resolves.toBe("Strip length L (nm)");
  });

  it("one-axis sweep with an ensemble: mean and error band against the field", async () => {
    const id = await finished("sweep", "sweeps", {
      computation: { kind: "conductance", energyMeV: 2 },
      axes: [{ parameter: "fieldTesla", from: 0, to: 0.4, points: 5 }],
      ensemble: { samples: 3 },
    });
    await page.goto(url(`/sweeps/${id}`));
    const plot = page.getByTestId("sweep-plot");
    await plot.locator("[data-band]").waitFor();
    await expect(plot.locator("[data-points] circle").count()).resolves.toBe(5);
    await expect(plot.locator("[data-label=x]").textContent()).resolves.toBe("Magnetic field B (T)");
    await expect(plot.locator("[data-label=y]").textContent()).resolves.toBe("Ensemble mean conductance G (e²/h)");
    const box = (await plot.locator("svg").boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await expect.poll(() => plot.getByTestId("readout").innerText()).toMatch(/Magnetic field B = [\d.]+ T · mean ± s\.e\. [\d.e-]+ ± [\d.e-]+ e²\/h/);
    await screenshot(page, "app-result-sweep-band.png");
  });
});
