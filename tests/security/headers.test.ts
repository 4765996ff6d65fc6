// Security headers: every page carries a CSP whose nonce is fresh per response and sits on every script
// Next.js renders; pages may not be framed; nosniff and the referrer policy everywhere, API included; HSTS
// and upgrade-insecure-requests only with SUMFOLD_HTTPS=true.
import { NextRequest } from "next/server";
import { afterEach, describe, expect, it } from "vitest";
import { proxy } from "@/proxy";
import { pageCsp } from "@/lib/security-headers";
import { baseUrl } from "../support/layout";

const PAGES = ["/", "/docs", "/docs/models", "/docs/limits", "/sign-in", "/sign-up", "/reset", "/no-such-page"];

function directives(csp: string): Map<string, string> {
  return new Map(csp.split(";").map((d) => d.trim()).filter(Boolean).map((d) => [d.split(/\s+/)[0], d.slice(d.indexOf(" ") + 1)]));
}

describe("page headers (next start)", () => {
  for (const path of PAGES) {
    it(`${path}: CSP with a per-response nonce on every script, no framing, nosniff, referrer policy`, async () => {
      const [a, b] = await Promise.all([fetch(`${baseUrl()}${path}`), fetch(`${baseUrl()}${path}`)]);
      const csp = a.headers.get("content-security-policy") ?? "";
      const d = directives(csp);
      expect(d.get("frame-ancestors"), csp).toBe("'none'");
      expect(d.get("object-src")).toBe("'none'");
      expect(d.get("base-uri")).toBe("'self'");
      const nonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(d.get("script-src") ?? "")?.[1];
      expect(nonce, csp).toBeTruthy();
      expect(d.get("script-src")).not.toMatch(/unsafe-inline|unsafe-eval/);
      const otherNonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(b.headers.get("content-security-policy") ?? "")?.[1];
      expect(otherNonce).toBeTruthy();
      expect(otherNonce).not.toBe(nonce);
      const html = await a.text();
      const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
      expect(scripts.length).toBeGreaterThan(0);
      for (const tag of scripts) expect(tag, `${path}: ${tag}`).toContain(`nonce="${nonce}"`);
      expect(a.headers.get("x-content-type-options")).toBe("nosniff");
      expect(a.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(a.headers.get("x-frame-options")).toBe("DENY");
      // Served over plain HTTP in the test run: no HSTS, no upgrade of sub-resources.
      expect(a.headers.get("strict-transport-security")).toBeNull();
      expect(csp).not.toContain("upgrade-insecure-requests");
    });
  }

  it("API responses: nosniff, referrer policy and a deny-all CSP", async () => {
    for (const path of ["/api/v1/health", "/api/v1/openapi.json", "/api/portal/me"]) {
      const res = await fetch(`${baseUrl()}${path}`);
      expect(res.headers.get("x-content-type-options"), path).toBe("nosniff");
      expect(res.headers.get("referrer-policy"), path).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("content-security-policy"), path).toBe("default-src 'none'; frame-ancestors 'none'");
    }
  });
});

describe("HSTS switch (proxy, in process)", () => {
  const saved = process.env.SUMFOLD_HTTPS;
  afterEach(() => {
    if (saved === undefined) delete process.env.SUMFOLD_HTTPS;
    else process.env.SUMFOLD_HTTPS = saved;
  });

  it("sends HSTS and upgrade-insecure-requests only when SUMFOLD_HTTPS=true", () => {
    delete process.env.SUMFOLD_HTTPS;
    const plain = proxy(new NextRequest("http://sumfold.test/docs"));
    expect(plain.headers.get("strict-transport-security")).toBeNull();
    expect(plain.headers.get("content-security-policy")).not.toContain("upgrade-insecure-requests");
    process.env.SUMFOLD_HTTPS = "true";
    const secure = proxy(new NextRequest("https://sumfold.test/docs"));
    expect(secure.headers.get("strict-transport-security")).toBe("max-age=31536000; includeSubDomains");
    expect(secure.headers.get("content-security-policy")).toContain("upgrade-insecure-requests");
  });

  it("hands the nonce to the render through the request's CSP header", () => {
    const res = proxy(new NextRequest("http://sumfold.test/"));
    const csp = res.headers.get("content-security-policy")!;
    const nonce = /'nonce-([^']+)'/.exec(csp)![1];
    expect(Buffer.from(nonce, "base64")).toHaveLength(16);
    expect(pageCsp(nonce)).toBe(csp);
    // NextResponse.next({ request: { headers } }) forwards overridden request headers under this prefix.
    expect(res.headers.get("x-middleware-request-content-security-policy")).toBe(csp);
    expect(res.headers.get("x-middleware-request-x-nonce")).toBe(nonce);
  });
});
