"use client";

import dynamic from "next/dynamic";
import { useEffect } from "react";
import "swagger-ui-react/swagger-ui.css";

// swagger-ui touches window at import time: load it in the browser only.
const SwaggerUI = dynamic(() => import("swagger-ui-react"), {
  ssr: false,
  loading: () => <p className="text-sm text-ink-faint">Loading the interactive reference…</p>,
});

/** Where swagger-ui keeps authorisations when asked to persist them; earlier versions of this page did. */
const PERSISTED_AUTH = "authorized";

export function Reference() {
  // The key pasted under Authorize lives in this page's memory only (no persistAuthorization): it is gone on
  // reload, on leaving the page and after sign-out. A key an older version of this page saved is wiped.
  useEffect(() => {
    try {
      window.localStorage.removeItem(PERSISTED_AUTH);
    } catch {
      /* storage may be unavailable (private mode): nothing to wipe */
    }
  }, []);
  return (
    <div className="space-y-2">
      <p id="authorize-note" className="rounded-md border border-paper-line bg-paper-warm px-3 py-2 text-sm text-ink-soft">
        <strong>Your key stays in this tab only.</strong> The key you paste under Authorize is kept in this page&apos;s memory: it is
        never saved in the browser and is forgotten when you reload, leave this page or sign out. Use a key with read scopes only,
        and revoke it from the Keys page if it was shown on a shared screen.
      </p>
      <div className="sumfold-reference rounded-lg border border-paper-line bg-white">
        <SwaggerUI url="/api/v1/openapi.json" tryItOutEnabled deepLinking docExpansion="list" defaultModelsExpandDepth={0} />
      </div>
    </div>
  );
}
