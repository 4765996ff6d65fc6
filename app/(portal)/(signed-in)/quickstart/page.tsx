import type { Metadata } from "next";
import { Quickstart } from "./quickstart";

export const metadata: Metadata = { title: "Quickstart" };

export default function QuickstartPage() {
  return <Quickstart />;
}
