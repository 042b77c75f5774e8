import type { Metadata } from "next";
import type { ReactNode } from "react";
import { ConsoleProviders } from "@/components/console/providers";

export const metadata: Metadata = {
  title: { default: "Console", template: "%s · Console · Paritas" },
  robots: { index: false, follow: false },
};

/** Every console page fetches in the client through TanStack Query; sign-in is required in (signed-in)/layout.tsx. */
export default function ConsoleLayout({ children }: { children: ReactNode }) {
  return <ConsoleProviders>{children}</ConsoleProviders>;
}
