// Cancelling from the sweep page: the button stops a running sweep; its page then says so and no
// further points are computed.
import { describe, expect, it } from "vitest";
import { url, useBrowser } from "../support/browser";
import { api } from "../support/services";

const browser = useBrowser();

describe("cancel from the page", () => {
  it("cancels a running scan and shows it cancelled", async () => {
    const network = {
      lattice: "triangular",
      size: { columns: 24, rows: 16 },
      transverse: "periodic",
      twistDegrees: 0.11,
      node: { forward: 0.5, left: 0.25, right: 0.25 },
      disorder: { linkPhaseWidthRad: 6.28, forwardSpread: 0, seed: 3 },
    };
    const res = await api("/api/v1/sweeps", {
      as: "researcher",
      method: "POST",
      json: { network, computation: { kind: "conductance" }, axes: [{ parameter: "energyMeV", from: 0, to: 30, points: 60 }], ensemble: { samples: 40 } },
    });
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as { id: string };
    const page = await browser.signedInPage("researcher");
    await page.goto(url(`/sweeps/${id}`));
    const cancel = page.getByRole("button", { name: "Cancel scan" });
    await cancel.waitFor();
    await cancel.click();
    await page.locator('[data-status="cancelled"]').waitFor({ timeout: 60_000 });
    // "12 done, 48 cancelled of 60": nothing running or queued, the cancelled share named, never 100 %.
    await expect.poll(() => page.getByTestId("sweep-counts").innerText(), { timeout: 30_000 }).toMatch(/^\d+ done(, \d+ failed)?, \d+ cancelled of 60$/);
    const percent = Number((await page.getByTestId("progress-percent").innerText()).replace("%", ""));
    expect(percent).toBeLessThan(100);
    await expect(page.locator('[data-share="cancelled"]').evaluate((e) => parseFloat((e as HTMLElement).style.width))).resolves.toBeGreaterThan(0);
    await expect(page.getByRole("button", { name: "Cancel scan" }).count()).resolves.toBe(0);
    const done = (await (await api(`/api/v1/sweeps/${id}`, { as: "researcher" })).json()) as { counts: { succeeded: number } };
    expect(done.counts.succeeded).toBeLessThan(60);
  });
});
