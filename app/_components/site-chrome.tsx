import { cookies } from "next/headers";
import Link from "next/link";
import { sessionUserId } from "@/lib/auth/session";
import { Caution } from "./caution";

/** The signed-in person's id from the session cookie, or null (no database look-up: the link only). */
async function signedIn(): Promise<boolean> {
  const jar = await cookies();
  const header = jar
    .getAll()
    .map((c) => `${c.name}=${encodeURIComponent(c.value)}`)
    .join("; ");
  return (await sessionUserId(header)) !== null;
}

export async function SiteHeader() {
  const inside = await signedIn();
  return (
    <header className="border-b border-paper-line bg-paper">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:p-2">
        Skip to content
      </a>
      <div className="mx-auto flex max-w-page items-center justify-between gap-4 px-5 py-4">
        <Link href="/" className="flex items-center gap-2 font-display text-xl font-semibold tracking-tight">
          {/* eslint-disable-next-line @next/next/no-img-element */}
          <img src="/sumfold-mark.svg" alt="" width={28} height={28} />
          Sumfold
        </Link>
        <nav aria-label="Main" className="flex items-center gap-5 text-sm font-semibold text-ink-soft">
          <Link href="/docs" className="hover:text-fold-600">
            API reference
          </Link>
          {inside ? (
            <Link href="/dashboard" className="rounded-md bg-ink px-3 py-1.5 text-paper hover:bg-fold-700">
              Portal
            </Link>
          ) : (
            <Link href="/sign-in" className="rounded-md bg-ink px-3 py-1.5 text-paper hover:bg-fold-700">
              Sign in
            </Link>
          )}
        </nav>
      </div>
    </header>
  );
}

export function SiteFooter() {
  return (
    <footer className="mt-16 border-t border-paper-line bg-paper-warm">
      <div className="mx-auto max-w-page space-y-3 px-5 py-8 text-sm text-ink-faint">
        <Caution />
        <p>Sumfold — sums of independent random quantities, folded together through their characteristic functions.</p>
      </div>
    </footer>
  );
}

export function ComingSoon({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="mx-auto max-w-page px-5 py-16">
      <p className="text-sm font-semibold uppercase tracking-wider text-fold-600">Coming</p>
      <h1 className="mt-2 font-display text-3xl font-semibold">{title}</h1>
      <div className="mt-4 max-w-2xl text-ink-soft">{children}</div>
    </section>
  );
}
