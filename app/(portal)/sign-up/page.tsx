import type { Metadata } from "next";
import { SignUpForm } from "./sign-up-form";

export const metadata: Metadata = { title: "Create an account" };

// The local mailbox's address is read at request time (set by `npm start`; a hosted deployment has none).
export const dynamic = "force-dynamic";

export default function SignUpPage() {
  return <SignUpForm mailboxUrl={process.env.SUMFOLD_MAILBOX_URL ?? null} />;
}
