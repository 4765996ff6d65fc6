import type { Metadata } from "next";
import { AcceptInvitation } from "./accept-invitation";

export const metadata: Metadata = { title: "Join an organisation" };

export default async function InvitePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { token } = await searchParams;
  return <AcceptInvitation token={typeof token === "string" ? token : ""} />;
}
