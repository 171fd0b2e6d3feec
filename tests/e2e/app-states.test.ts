// Inline messages of the run form (the engine's schema, field by field) and the not-found page
// of the signed-in area.
import { describe, expect, it } from "vitest";
import { fill, url, useBrowser } from "../support/browser";
import { api } from "../support/services";

const browser = useBrowser();

describe("states of the web app", () => {
  it("names the field and the allowed range when a calculation parameter is out of bounds", async () => {
    const list = (await (await api("/api/v1/networks?limit=50", { as: "researcher" })).json()) as { networks: { id: string; name: string }[] };
    const id = list.networks.find((n) => n.name.startsWith("Clean"))!.id;
    const page = await browser.signedInPage("researcher");
    await page.goto(url(`/networks/${id}`));
    const form = page.getByRole("form", { name: "Start a calculation" });
    await form.waitFor();
    await fill(page, "run.temperatureK", -1);
    const message = page.locator('[data-field-error="run.temperatureK"]');
    await message.waitFor();
    await expect(message.innerText()).resolves.toMatch(/0/);
    await expect(form.getByRole("button", { name: "Run conductance" }).isDisabled()).resolves.toBe(true);
    await expect(form.getByTestId("estimate").innerText()).resolves.toMatch(/once every field is valid/);
    await fill(page, "run.temperatureK", 1.5);
    await expect.poll(() => message.count()).toBe(0);
    await expect(form.getByRole("button", { name: "Run conductance" }).isEnabled()).resolves.toBe(true);
    await page.close();
  });

  it("shows the group's not-found page for a calculation that is not there", async () => {
    const page = await browser.signedInPage("researcher");
    await page.goto(url("/runs/00000000-0000-4000-8000-000000000000"));
    await page.getByRole("heading", { name: "Nothing here in this group" }).waitFor();
    await expect(page.getByRole("link", { name: "Go to networks" }).count()).resolves.toBe(1);
    await page.close();
  });
});
