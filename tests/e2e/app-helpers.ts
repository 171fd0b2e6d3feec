// Shared steps of the web-app browser tests (app*.test.ts, a11y*.test.ts).
import { existsSync } from "node:fs";
import { join } from "node:path";
import type { Browser, Page } from "playwright-core";
import { appUrl, demoTokens, type DemoTokenKey } from "../support/services";

export const url = (path: string) => new URL(path, appUrl()).toString();

/**
 * A page signed in as a demo member: through the sign-in helper of the accounts work
 * (tests/support/session.ts) when it is there, else with the member's demo API token sent on
 * every request (the server treats it like a session of that member, same workspace and role).
 */
export async function signedInPage(browser: Browser, who: DemoTokenKey = "researcher"): Promise<{ page: Page; how: "session" | "token" }> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
  const page = await context.newPage();
  page.setDefaultTimeout(20_000);
  const helper = join(import.meta.dirname, "..", "support", "session.ts");
  if (existsSync(helper)) {
    const mod = (await import(/* @vite-ignore */ helper)) as Record<string, unknown>;
    const fn = (mod.signIn ?? mod.signInPage ?? mod.signInAs) as ((page: Page, who: DemoTokenKey) => Promise<unknown>) | undefined;
    if (typeof fn === "function") {
      await fn(page, who);
      return { page, how: "session" };
    }
  }
  await context.setExtraHTTPHeaders({ authorization: `Bearer ${demoTokens()[who]}` });
  return { page, how: "token" };
}

/** Types into a field, replacing what was there. */
export async function fill(page: Page, id: string, value: string | number) {
  const el = page.locator(`[id="${id}"]`);
  await el.fill(String(value));
}
