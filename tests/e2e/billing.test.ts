// Browser: a Billing admin upgrades a Free lab workspace to Lab through the Checkout stand-in,
// sees plan, seats and usage on the Billing page, and opens the portal stand-in and comes back.
// Uses a lab workspace of its own (new people and organization at the sign-in stand-in), so the
// demo lab keeps its figures for other test files.
import { describe, expect, it } from "vitest";
import { screenshot, url, useBrowser } from "../support/browser";
import { createStandInUser } from "../support/session";

const browser = useBrowser();

const clerk = (path: string, body: unknown) =>
  fetch(`${process.env.CLERK_FAKE_URL}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json", authorization: `Bearer ${process.env.CLERK_SECRET_KEY}` },
    body: JSON.stringify(body),
  }).then(async (r) => {
    if (!r.ok) throw new Error(`sign-in stand-in ${path}: ${r.status} ${await r.text()}`);
    return r.json() as Promise<{ id: string }>;
  });

describe("Billing page", () => {
  it("a Billing admin upgrades to Lab, sees seats and usage, and opens the portal stand-in", async () => {
    const tag = Date.now().toString(36);
    const owner = await createStandInUser({ email: `owner-${tag}@harrowgate.example`, name: "Odile Harrow" });
    const admin = await createStandInUser({ email: `billing-${tag}@harrowgate.example`, name: "Bram Kestel" });
    const org = await clerk("/v1/organizations", { name: `Harrowgate Spin Lab ${tag}`, created_by: owner.clerkUserId });
    await clerk(`/v1/organizations/${org.id}/memberships`, { user_id: admin.clerkUserId, role: "org:billing_admin" });
    const page = await browser.signedInPage({ email: admin.email, password: admin.password }, { organizationId: org.id });

    await page.goto(url("/billing"));
    await page.locator('[data-testid="billing-page"]').waitFor();
    expect(await page.locator('[data-testid="plan-label"]').innerText()).toBe("Free");

    await Promise.all([page.waitForURL(/\/checkout\/cs_test_/), page.locator('[data-testid="upgrade"]').click()]);
    expect(await page.locator('[data-testid="checkout-total"]').innerText()).toMatch(/USD/);
    await Promise.all([page.waitForURL(/\/billing\?checkout=success/), page.getByRole("button", { name: "Pay and subscribe" }).click()]);

    await page.locator('[data-testid="checkout-done"]').waitFor();
    await expect.poll(async () => page.locator('[data-testid="plan-label"]').innerText(), { timeout: 20_000 }).toBe("Lab");
    const seats = Number(await page.locator('[data-testid="seats"]').innerText());
    expect(seats).toBeGreaterThanOrEqual(1);
    await page.locator('[data-testid="usage-members"]').waitFor();
    expect(await page.locator('[data-testid="usage-members"]').innerText()).toContain("Bram Kestel");
    await page.locator('figure[data-chart^="usage-"]').waitFor();
    await screenshot(page, "billing-lab.png");

    await Promise.all([page.waitForURL(/\/portal\/bps_/), page.locator('[data-testid="open-portal"]').click()]);
    expect(await page.locator('[data-testid="portal-status"]').innerText()).toBe("Status: active");
    expect(await page.content()).toContain("TRSK-");
    await Promise.all([page.waitForURL(/\/billing$/), page.locator('[data-testid="portal-return"]').click()]);
    await page.locator('[data-testid="billing-page"]').waitFor();
    await page.locator('[data-testid="invoices"]').waitFor();
    expect(await page.locator('[data-testid="invoices"]').innerText()).toContain("paid");
    await page.context().close();
  });
});
