import type { Metadata } from "next";
import type { ReactNode } from "react";
import { bodyFont, displayFont, monoFont } from "./fonts";
import { SiteFooter, SiteHeader } from "./_components/site-chrome";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Sumfold — distributions of sums, from their characteristic functions", template: "%s · Sumfold" },
  description:
    "A read-only computation API: characteristic functions, densities, CDFs, quantiles, expected shortfall and moments of sums of independent random quantities.",
  icons: { icon: "/sumfold-mark.svg" },
};

// Every page renders per request, so Next.js can put this response's CSP nonce on its scripts (proxy.ts).
export const dynamic = "force-dynamic";

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={`${bodyFont.variable} ${displayFont.variable} ${monoFont.variable}`}>
      <body className="flex min-h-screen flex-col">
        <SiteHeader />
        <main id="main" className="flex-1">
          {children}
        </main>
        <SiteFooter />
      </body>
    </html>
  );
}
