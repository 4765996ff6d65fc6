import { getServerSession } from "next-auth";
import { headers } from "next/headers";
import { redirect } from "next/navigation";
import { Suspense, type ReactNode } from "react";
import { authOptions } from "@/lib/auth/options";
import { currentSession } from "@/lib/auth/session";
import { DbUnavailableError } from "@/lib/db/client";
import { PortalShell } from "./portal-shell";

// Signed-in pages: the session is checked here; every handler they call re-checks it and the role.
export default async function SignedInLayout({ children }: { children: ReactNode }) {
  // The session check runs under the database deadline: when the database stops answering, the page says so
  // within seconds instead of hanging (and keeps the sign-in, which is checked again on the next visit).
  try {
    if (!(await currentSession((await headers()).get("cookie")))) redirect("/sign-in");
  } catch (e) {
    if (e instanceof DbUnavailableError) return <Unavailable />;
    throw e;
  }
  const session = await getServerSession(authOptions);
  if (!session?.user?.id) redirect("/sign-in");
  return (
    <Suspense>
      <PortalShell>{children}</PortalShell>
    </Suspense>
  );
}

function Unavailable() {
  return (
    <main className="mx-auto max-w-xl px-6 py-16" data-testid="portal-unavailable">
      <h1 className="text-xl font-semibold">The portal is briefly unavailable</h1>
      <p className="mt-3 text-sm text-slate-600">Our database is not answering right now. Nothing is lost: reload this page in a few seconds.</p>
    </main>
  );
}
