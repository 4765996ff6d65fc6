import type { Metadata } from "next";
import { MembersManager } from "./members-manager";

export const metadata: Metadata = { title: "Members" };

export default function MembersPage() {
  return <MembersManager />;
}
