import type { Metadata } from "next";
import { ResetForms } from "./reset-forms";

export const metadata: Metadata = { title: "Reset your password" };

export default async function ResetPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { token } = await searchParams;
  return <ResetForms token={typeof token === "string" ? token : null} />;
}
