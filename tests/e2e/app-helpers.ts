// Shared steps of the web-app browser tests (app*.test.ts, a11y*.test.ts).
import type { Browser, Page } from "playwright-core";
import { appUrl } from "../support/services";
import { signInPage, signInThroughForm, type DemoPersonKey } from "../support/session";

export const url = (path: string) => new URL(path, appUrl()).toString();

/** A fresh browser context signed in as a demo person (lab workspace), through the form if asked. */
export async function signedInPage(browser: Browser, who: DemoPersonKey = "researcher", opts: { throughForm?: boolean } = {}): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
  const page = await context.newPage();
  page.setDefaultTimeout(30_000);
  if (opts.throughForm) await signInThroughForm(page, who);
  else await signInPage(page, who);
  return page;
}

/** Types into a field, replacing what was there. */
export async function fill(page: Page, id: string, value: string | number) {
  await page.locator(`[id="${id}"]`).fill(String(value));
}
