import type { Metadata } from "next";
import { ComingSoon } from "../_components/site-chrome";

export const metadata: Metadata = { title: "API reference" };

export default function DocsPage() {
  return (
    <ComingSoon title="API reference">
      <p>The interactive reference for the v1 endpoints is being prepared. Until then, GET /api/v1/health answers without a key.</p>
    </ComingSoon>
  );
}
