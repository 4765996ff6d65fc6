"use client";

import dynamic from "next/dynamic";
import "swagger-ui-react/swagger-ui.css";

// swagger-ui touches window at import time: load it in the browser only.
const SwaggerUI = dynamic(() => import("swagger-ui-react"), {
  ssr: false,
  loading: () => <p className="text-sm text-ink-faint">Loading the interactive reference…</p>,
});

export function Reference() {
  return (
    <div className="sumfold-reference rounded-lg border border-paper-line bg-white">
      <SwaggerUI url="/api/v1/openapi.json" tryItOutEnabled persistAuthorization deepLinking docExpansion="list" defaultModelsExpandDepth={0} />
    </div>
  );
}
