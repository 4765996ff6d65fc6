/**
 * The security headers of the site, in one place. Pages get a Content-Security-Policy with a fresh nonce per
 * response (proxy.ts; Next.js puts the nonce on its own scripts); every response, API included, gets the
 * static ones (next.config.ts). HSTS and upgrade-insecure-requests are sent only when SUMFOLD_HTTPS=true,
 * i.e. when the site is served over HTTPS (behind a TLS-terminating proxy or load balancer).
 */
export const STATIC_HEADERS: { key: string; value: string }[] = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  // For browsers that predate frame-ancestors.
  { key: "X-Frame-Options", value: "DENY" },
];

/** JSON endpoints never render in a browser: nothing may load from them and nobody may frame them. */
export const API_CSP = "default-src 'none'; frame-ancestors 'none'";

export const HSTS = "max-age=31536000; includeSubDomains";

export const httpsEnabled = () => /^(1|true|yes|on)$/i.test(process.env.SUMFOLD_HTTPS ?? "");

/**
 * The pages' policy. Scripts: only those carrying this response's nonce, and what they load ('strict-dynamic').
 * Styles allow inline style attributes (charts and the API reference set positions inline), which cannot
 * run code; everything else is same-origin only.
 */
export function pageCsp(nonce: string, opts: { dev?: boolean; https?: boolean } = {}): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(opts.https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}
