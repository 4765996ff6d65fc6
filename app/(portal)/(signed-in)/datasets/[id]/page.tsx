import type { Metadata } from "next";
import { DatasetDetail } from "../dataset-detail";

export const metadata: Metadata = { title: "Dataset" };

export default async function DatasetPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <DatasetDetail id={id} />;
}
