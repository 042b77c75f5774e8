import type { Metadata } from "next";
import { OrgPicker } from "./org-picker";

export const metadata: Metadata = { title: "Organisations" };

export default function ConsoleHome() {
  return <OrgPicker />;
}
