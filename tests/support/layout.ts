import type { Layout } from "../../scripts/lib/config";

/** The services scripts/test.ts started for this run (ports, data dirs). */
export function testLayout(): Layout {
  const raw = process.env.SUMFOLD_TEST_LAYOUT;
  if (!raw) throw new Error("SUMFOLD_TEST_LAYOUT is not set: run the suite with `npm test`");
  return JSON.parse(raw) as Layout;
}

export const baseUrl = () => {
  const url = process.env.SUMFOLD_TEST_BASE_URL;
  if (!url) throw new Error("SUMFOLD_TEST_BASE_URL is not set: run the suite with `npm test`");
  return url;
};
