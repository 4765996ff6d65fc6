import type { Metadata } from "next";
import { KeysManager } from "./keys-manager";

export const metadata: Metadata = { title: "API keys" };

export default function KeysPage() {
  return <KeysManager />;
}
