import type { Metadata } from "next";
import { ModelsList } from "./models-list";

export const metadata: Metadata = { title: "Saved models" };

export default function ModelsPage() {
  return <ModelsList />;
}
