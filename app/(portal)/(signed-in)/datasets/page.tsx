import type { Metadata } from "next";
import { DatasetsManager } from "./datasets-manager";

export const metadata: Metadata = { title: "Datasets" };

export default function DatasetsPage() {
  return <DatasetsManager />;
}
