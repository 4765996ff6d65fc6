import type { Metadata } from "next";
import { ComingSoon } from "../_components/site-chrome";

export const metadata: Metadata = { title: "Sign in" };

export default function SignInPage() {
  return (
    <ComingSoon title="Sign in">
      <p>The developer portal — sign-in, organisations, API keys and usage — opens soon.</p>
    </ComingSoon>
  );
}
