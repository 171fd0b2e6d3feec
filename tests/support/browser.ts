/**
 * The browser tests' one fixture: headless Debian Chromium driven by playwright-core (no browser
 * download), launched once per test file, and the page helpers every browser test uses.
 *
 *   import { fill, screenshot, url, useBrowser } from "../support/browser";
 *
 *   const browser = useBrowser();                       // launched before the file's tests, closed after
 *   it("...", async () => {
 *     const page = await browser.signedInPage("researcher");                      // session cookies, lab workspace
 *     const form = await browser.signedInPage("viewer", { throughForm: true });   // through the sign-in page
 *     const guest = await browser.newPage();                                      // signed out
 *     await page.goto(url("/networks/new"));
 *     await fill(page, "size.columns", 200);
 *     await screenshot(page, "app-network.png");                                  // tests/e2e/screenshots/
 *   });
 *
 * Every page gets a context of its own (its own cookies), the same viewport and a 30 s default
 * timeout. People who are not demo people sign in with their credentials and, if they have one,
 * their organization: browser.signedInPage({ email, password }, { organizationId }).
 */
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { chromium, type Browser, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";
import { appUrl } from "./services";
import { signInPage, signInThroughForm, type Credentials, type DemoPersonKey, type SessionOptions } from "./session";

export const SCREENSHOT_DIR = join(import.meta.dirname, "..", "e2e", "screenshots");

/** The viewport of every page the fixture opens. */
export const VIEWPORT = { width: 1440, height: 1000 };

/** An absolute URL of the app under test. */
export const url = (path: string) => new URL(path, appUrl()).toString();

async function launchBrowser(): Promise<Browser> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  // playwright gives every launch a fresh, temporary profile folder and removes it on close.
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-dev-shm-usage",
    ],
  });
}

export interface BrowserFixture {
  /** The launched browser; there is one only inside tests and hooks. */
  readonly browser: Browser;
  /** A fresh context and page, signed out. */
  newPage(): Promise<Page>;
  /**
   * A fresh context and page signed in as a demo person (lab workspace for lab members) or as a
   * person given by credentials; through the real sign-in page if `throughForm`.
   */
  signedInPage(who: DemoPersonKey | Credentials, opts?: SessionOptions & { throughForm?: boolean }): Promise<Page>;
}

/** Launches the browser before the file's tests and closes it after them; call at the top of a file. */
export function useBrowser(): BrowserFixture {
  let launched: Browser | undefined;
  beforeAll(async () => {
    launched = await launchBrowser();
  });
  afterAll(async () => {
    await launched?.close();
  });
  const browser = () => {
    if (!launched) throw new Error("the browser is launched in beforeAll: use it inside tests and hooks, not at the top of the file");
    return launched;
  };
  const newPage = async () => {
    const context = await browser().newContext({ viewport: VIEWPORT, acceptDownloads: true });
    const page = await context.newPage();
    page.setDefaultTimeout(30_000);
    return page;
  };
  return {
    get browser() {
      return browser();
    },
    newPage,
    async signedInPage(who, opts = {}) {
      const { throughForm, ...session } = opts;
      const page = await newPage();
      if (throughForm) await signInThroughForm(page, who);
      else await signInPage(page, who, session);
      return page;
    },
  };
}

/** Types into the field with this id, replacing what was there. */
export async function fill(page: Page, id: string, value: string | number): Promise<void> {
  await page.locator(`[id="${id}"]`).fill(String(value));
}

/** Saves a screenshot to tests/e2e/screenshots/ (the whole page unless `fullPage: false`). */
export async function screenshot(page: Page, file: string, opts: { fullPage?: boolean } = {}): Promise<void> {
  await page.screenshot({ path: join(SCREENSHOT_DIR, file), fullPage: opts.fullPage ?? true });
}
