import { mkdirSync } from "node:fs";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { chromium, type Browser, type BrowserContext } from "playwright-core";

export const SCREENSHOTS = resolve(import.meta.dirname, "../../test-results/screenshots");

/** Debian's chromium, headless, with the flags that keep it off the network on this machine. */
export async function launchBrowser(): Promise<{ browser: BrowserContext; close: () => Promise<void> }> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  const userDataDir = mkdtempSync(join(tmpdir(), "sumfold-chromium-"));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
    viewport: { width: 1280, height: 860 },
  });
  return { browser: context, close: () => context.close() };
}

export type { Browser };
