// Every page response: a Content-Security-Policy with a fresh nonce (Next.js reads it from the request's CSP
// header and puts it on its scripts), and HSTS when SUMFOLD_HTTPS=true. API routes are not matched: the proxy
// would buffer their request bodies (uploads), and their static headers come from next.config.ts.
import { NextResponse, type NextRequest } from "next/server";
import { HSTS, httpsEnabled, pageCsp } from "@/lib/security-headers";

export function proxy(request: NextRequest) {
  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString("base64");
  const https = httpsEnabled();
  const csp = pageCsp(nonce, { dev: process.env.NODE_ENV === "development", https });
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("x-nonce", nonce);
  requestHeaders.set("content-security-policy", csp);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("content-security-policy", csp);
  if (https) response.headers.set("strict-transport-security", HSTS);
  return response;
}

export const config = {
  matcher: [
    {
      source: "/((?!api/|_next/static|_next/image|favicon.ico|sumfold-mark.svg).*)",
      missing: [
        { type: "header", key: "next-router-prefetch" },
        { type: "header", key: "purpose", value: "prefetch" },
      ],
    },
  ],
};
