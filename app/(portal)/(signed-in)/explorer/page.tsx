import type { Metadata } from "next";
import { Caution } from "@/app/_components/caution";
import { Explorer } from "./explorer";

export const metadata: Metadata = { title: "Explorer" };

export default function ExplorerPage() {
  return (
    <div className="space-y-6">
      <Caution />
      <Explorer />
    </div>
  );
}
