import type { ReactNode } from "react";

/** The sign-in family of pages: one narrow column on squared paper. */
export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <div className="pa-grid pa-fill border-b border-rule">
      <div className="mx-auto max-w-md px-5 pt-10 pb-16 sm:px-0 sm:pt-16 sm:pb-24">{children}</div>
    </div>
  );
}
