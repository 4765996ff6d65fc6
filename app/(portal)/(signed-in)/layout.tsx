import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import { Suspense, type ReactNode } from "react";
import { authOptions } from "@/lib/auth/options";
import { PortalShell } from "./portal-shell";

// Signed-in pages: the session is checked here; every handler they call re-checks it and the role.
export default async function SignedInLayout({ children }: { children: ReactNode }) {
  const session = await getServerSession(authOptions);
  if (!session?.user?.id) redirect("/sign-in");
  return (
    <Suspense>
      <PortalShell>{children}</PortalShell>
    </Suspense>
  );
}
