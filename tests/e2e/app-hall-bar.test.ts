// A Hall bar in the browser: the contacts drawn on the sample and placed by column, the calculation
// started from the form, and its result page with R_xx, R_xy (in ohms and h/e^2), the terminals and
// the conductance matrix; axe checks on both pages. The network is synthetic.
import { beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { screenshot, url, useBrowser } from "../support/browser";
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
      name: `Hall bar e2e ${Date.now().toString(36)} (synthetic)`,
      network: {
        lattice: "triangular",
        size: { columns: 9, rows: 6 },
        transverse: "open",
        twistDegrees: 0.11,
        node: { forward: 0.5, left: 0.3, right: 0.2 },
        disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 5 },
      },
    },
  });
  expect(made.status, await made.clone().text()).toBe(201);
  networkId = (await made.json()).id;
  page = await browser.signedInPage("researcher");
});

describe("Hall bar in the browser", () => {
  it("draws the six-terminal bar, moves a contact by column, runs, and shows the resistances and the matrix", async () => {
    await page.goto(url(`/networks/${networkId}`));
    const form = page.getByRole("form", { name: "Start a calculation" });
    await form.getByRole("radio", { name: "Hall bar" }).click();
    const editor = page.getByTestId("hall-bar-contacts");
    await editor.waitFor();
    const strip = editor.getByTestId("contact-strip");
    await expect(strip.locator("[data-contact]").count()).resolves.toBe(4);
    await expect(strip.getAttribute("aria-label")).resolves.toMatch(/top1 on the top edge, columns 3 to 3/);
    // the contacts are drawn on the network drawing too, as named windows on its edges
    const drawn = editor.locator("svg[data-renderer=svg] [data-layer=contacts] [data-contact]");
    await expect(drawn.count()).resolves.toBe(4);
    await expect(editor.locator('svg[data-renderer=svg] [data-contact="bottom2"] text').textContent()).resolves.toBe("bottom2");
    // drag bottom1 two columns to the right along its edge (column 3 -> 5)
    await strip.scrollIntoViewIfNeeded();
    const box = (await strip.boundingBox())!;
    const handle = (await strip.locator('[data-contact="bottom1"] rect').boundingBox())!;
    const column = (box.width * ((640 - 2 * 36) / 9)) / 640;
    await page.mouse.move(handle.x + handle.width / 2, handle.y + handle.height / 2);
    await page.mouse.down();
    await page.mouse.move(handle.x + handle.width / 2 + column, handle.y + handle.height / 2, { steps: 4 });
    await page.mouse.move(handle.x + handle.width / 2 + 2 * column, handle.y + handle.height / 2, { steps: 4 });
    await page.mouse.up();
    await expect.poll(() => strip.getAttribute("aria-label")).toMatch(/bottom1 on the bottom edge, columns 5 to 5/);
    await expect(editor.getByLabel("bottom1: from column").inputValue()).resolves.toBe("5");
    // move top2 from column 6 to columns 5-7 by typing
    await editor.getByLabel("top2: to column").fill("7");
    await editor.getByLabel("top2: from column").fill("5");
    await expect(strip.getAttribute("aria-label")).resolves.toMatch(/top2 on the top edge, columns 5 to 7/);
    // an overlapping window is named before sending
    await editor.getByLabel("top1: to column").fill("5");
    await expect(page.getByTestId("hall-bar-contact-problems").innerText()).resolves.toMatch(/top2 overlaps top1 on the top edge/);
    await editor.getByLabel("top1: to column").fill("3");
    await expect(page.getByTestId("hall-bar-contact-problems").count()).resolves.toBe(0);
    await expect(seriousViolations(page)).resolves.toEqual([]);
    await screenshot(page, "app-hall-bar-form.png");
    await form.getByRole("button", { name: "Run hall bar" }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.locator('[data-status="succeeded"]').waitFor({ timeout: 90_000 });
    const figures = await page.getByTestId("hall-bar-resistances").innerText();
    expect(figures).toMatch(/Longitudinal resistance R_xx\s+-?[\d.]+(e-?\d+)? Ω/);
    expect(figures).toMatch(/Hall resistance R_xy\s+-?[\d.]+(e-?\d+)? Ω/);
    expect(figures).toMatch(/h\/e²/);
    await expect(page.getByTestId("hall-bar-terminals").locator("tr[data-terminal]").count()).resolves.toBe(6);
    await expect(page.getByTestId("hall-bar-terminals").locator('tr[data-terminal="top2"]').innerText()).resolves.toMatch(/top edge\s+5–7/);
    await expect(page.getByTestId("hall-bar-matrix").locator("tbody tr").count()).resolves.toBe(6);
    await expect(page.getByTestId("hall-bar-checks").innerText()).resolves.toMatch(/row sum/);
    // the run used the contacts of the form
    const runId = page.url().split("/").pop()!;
    const run = await (await api(`/api/v1/runs/${runId}`, { as: "researcher" })).json();
    expect(run.input.computation.contacts.find((c: { name: string }) => c.name === "top2")).toEqual({ name: "top2", edge: "top", fromColumn: 5, toColumn: 7 });
    await expect(seriousViolations(page)).resolves.toEqual([]);
    await screenshot(page, "app-hall-bar-result.png");
  });
});
