// Tables of runs and sweeps (filters and pages through the API, sorting the page shown) and what
// each role sees: a viewer gets no create or run buttons, an owner sees Billing in the navigation.
import { beforeAll, describe, expect, it } from "vitest";
import { url, useBrowser } from "../support/browser";
import { api } from "../support/services";

const browser = useBrowser();

let networkId = "";

beforeAll(async () => {
  const list = (await (await api("/api/v1/networks?limit=50", { as: "researcher" })).json()) as { networks: { id: string; name: string }[] };
  networkId = list.networks.find((n) => n.name.startsWith("Clean"))!.id;
  // Two small runs to list: one conductance, one band structure.
  for (const computation of [
    { kind: "conductance", energyMeV: 1 },
    { kind: "spectrum", pathPointsPerSegment: 2 },
  ]) {
    const res = await api("/api/v1/runs", { as: "researcher", method: "POST", json: { networkId, computation } });
    expect(res.status).toBe(202);
  }
});

describe("calculations table", () => {
  it("filters by computation through the API and sorts the page", async () => {
    const page = await browser.signedInPage("researcher");
    const asked: string[] = [];
    page.on("request", (r) => {
      if (r.url().includes("/api/v1/runs?")) asked.push(r.url());
    });
    await page.goto(url("/runs"));
    const table = page.getByRole("table", { name: "calculations" });
    await table.waitFor();
    await expect.poll(() => table.locator("tbody tr").count()).toBeGreaterThanOrEqual(2);
    await page.getByRole("search", { name: "Filter calculations" }).getByLabel("Computation").selectOption("spectrum");
    await expect.poll(() => asked.some((u) => new URL(u).searchParams.get("kind") === "spectrum")).toBe(true);
    await expect.poll(async () => (await table.locator("tbody tr").allInnerTexts()).every((t) => t.includes("Band structure"))).toBe(true);
    await page.getByRole("search", { name: "Filter calculations" }).getByLabel("Computation").selectOption("");
    await expect.poll(async () => (await table.locator("tbody tr").allInnerTexts()).some((t) => t.includes("Conductance"))).toBe(true);
    // Sort by computation: rows come in ascending order of the computation kind.
    await table.getByRole("button", { name: /Computation/ }).click();
    await expect(table.locator("th[aria-sort]").getAttribute("aria-sort")).resolves.toBe("ascending");
    const kinds = (await table.locator("tbody tr td:nth-child(2)").allInnerTexts()).map((t) => t.trim());
    const kindsRaw = kinds.map(
      (k) =>
        ({
          Conductance: "conductance",
          "Band structure": "spectrum",
          "Density of states": "dos",
          "Local density of states": "ldos",
          "Localization length": "localization",
          "Hall bar": "hallBar",
        })[k] ?? k,
    );
    expect(kindsRaw).toEqual([...kindsRaw].sort());
    await page.close();
  });
});

describe("roles in the interface", () => {
  it("gives a viewer the create and start buttons disabled, each with the reason", async () => {
    const page = await browser.signedInPage("viewer");
    await page.goto(url("/networks"));
    await page.getByRole("table", { name: "networks" }).waitFor();
    await expect.poll(() => page.locator("aside").innerText()).toMatch(/Viewer/i);
    await expect(page.getByRole("link", { name: "New network" }).count()).resolves.toBe(0);
    await expect(page.getByRole("button", { name: "New network" }).isDisabled()).resolves.toBe(true);
    await page.goto(url(`/networks/${networkId}`));
    await page.locator("#run-refusal").waitFor();
    await expect(page.getByRole("button", { name: "Run conductance" }).isDisabled()).resolves.toBe(true);
    await expect(page.getByRole("button", { name: /Save as new version/ }).isDisabled()).resolves.toBe(true);
    await page.close();
  });

  it("shows Billing in the navigation to an owner", async () => {
    const page = await browser.signedInPage("owner");
    await page.goto(url("/networks"));
    const nav = page.getByRole("navigation", { name: "Main" });
    await expect.poll(() => nav.getByRole("link", { name: /^Billing/ }).count(), { timeout: 20_000 }).toBe(1);
    await page.close();
  });
});
