// Headless Debian Chromium driven by playwright-core (no browser download).
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { chromium, type Browser } from "playwright-core";

export const SCREENSHOT_DIR = join(import.meta.dirname, "..", "e2e", "screenshots");

export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const browser = await chromium.launch({
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
  return {
    browser,
    // playwright gives every launch a fresh, temporary profile folder and removes it on close.
    close: () => browser.close(),
  };
}
