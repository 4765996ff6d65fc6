import type { Metadata } from "next";
import { AccountSecurity } from "./account-security";

export const metadata: Metadata = { title: "Sign-in and security" };

export default function AccountPage() {
  return <AccountSecurity />;
}
