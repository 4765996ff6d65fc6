import { afterAll, beforeAll } from "vitest";
import { launchBrowser } from "../support/browser";

/** One headless chromium for the test file: launched before its tests, closed after them. */
export function useBrowser() {
  let session: Awaited<ReturnType<typeof launchBrowser>> | undefined;
  beforeAll(async () => {
    session = await launchBrowser();
  });
  afterAll(async () => {
    await session?.close();
  });
  return {
    get browser() {
      if (!session) throw new Error("the browser is launched in beforeAll; use it inside a test");
      return session.browser;
    },
  };
}
