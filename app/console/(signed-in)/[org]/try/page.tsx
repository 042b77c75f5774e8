import type { Metadata } from "next";
import { BenchView } from "./bench-view";

export const metadata: Metadata = { title: "Bench" };

export default function TryPage() {
  return <BenchView />;
}
