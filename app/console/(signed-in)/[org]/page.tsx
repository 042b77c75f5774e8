import type { Metadata } from "next";
import { OrgSummaryView } from "./summary-view";

export const metadata: Metadata = { title: "Summary" };

export default function OrgHome() {
  return <OrgSummaryView />;
}
