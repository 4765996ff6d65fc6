import type { Metadata } from "next";
import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import { authOptions } from "@/lib/auth/options";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

const safePath = (p: string | string[] | undefined) => (typeof p === "string" && p.startsWith("/") && !p.startsWith("//") ? p : "/dashboard");

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const sp = await searchParams;
  const next = safePath(sp.callbackUrl ?? sp.next);
  // Someone already signed in goes straight on (a notice such as "verified" is for people signing in).
  if (!sp.notice && (await getServerSession(authOptions))?.user?.id) redirect(next);
  return <SignInForm next={next} notice={typeof sp.notice === "string" ? sp.notice : undefined} />;
}
