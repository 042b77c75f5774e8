import type { Metadata } from "next";
import { SimulationsView } from "./simulations-view";

export const metadata: Metadata = { title: "Simulations" };

export default function SimulationsPage() {
  return <SimulationsView />;
}
