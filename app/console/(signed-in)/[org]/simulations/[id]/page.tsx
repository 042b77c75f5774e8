import type { Metadata } from "next";
import { SimulationResult } from "./simulation-result";

export const metadata: Metadata = { title: "Simulation" };

export default async function SimulationPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return <SimulationResult id={id} />;
}
