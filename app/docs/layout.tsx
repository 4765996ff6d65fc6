import Link from "next/link";
import type { ReactNode } from "react";

const guides = [
  { href: "/docs", label: "Reference" },
  { href: "/docs/authentication", label: "Authentication" },
  { href: "/docs/models", label: "Model notation" },
  { href: "/docs/snippets", label: "Code snippets" },
  { href: "/docs/errors", label: "Errors" },
  { href: "/docs/limits", label: "Limits and rate limits" },
];

export default function DocsLayout({ children }: { children: ReactNode }) {
  return (
    <div className="mx-auto grid max-w-page grid-cols-[minmax(0,1fr)] gap-8 px-5 py-10 md:grid-cols-[13rem_minmax(0,1fr)]">
      <nav aria-label="Documentation" className="md:sticky md:top-6 md:self-start">
        <p className="text-xs font-semibold uppercase tracking-wider text-ink-faint">API v1</p>
        <ul className="mt-3 space-y-1 text-sm">
          {guides.map((g) => (
            <li key={g.href}>
              <Link href={g.href} className="block rounded px-2 py-1 text-ink-soft hover:bg-paper-warm hover:text-fold-700">
                {g.label}
              </Link>
            </li>
          ))}
        </ul>
      </nav>
      <div className="min-w-0">{children}</div>
    </div>
  );
}
