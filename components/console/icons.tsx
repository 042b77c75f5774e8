/**
 * The console's icons: drawn for Paritas on a 20-unit grid with a 1.6 stroke, inheriting the
 * text colour. Decorative by default (aria-hidden); give a `title` to make one meaningful.
 */
import type { ReactNode } from "react";

function Icon({ children, className = "h-5 w-5", title }: { children: ReactNode; className?: string; title?: string }) {
  return (
    <svg
      viewBox="0 0 20 20"
      fill="none"
      stroke="currentColor"
      strokeWidth="1.6"
      strokeLinecap="round"
      strokeLinejoin="round"
      className={className}
      aria-hidden={title ? undefined : true}
      role={title ? "img" : undefined}
      focusable="false"
    >
      {title ? <title>{title}</title> : null}
      {children}
    </svg>
  );
}

type P = { className?: string; title?: string };

/** Summary: four tiles, one marked like a parity bit. */
export const IconSummary = (p: P) => (
  <Icon {...p}>
    <rect x="3" y="3" width="6" height="6" rx="1.2" />
    <rect x="11" y="3" width="6" height="6" rx="1.2" />
    <rect x="3" y="11" width="6" height="6" rx="1.2" />
    <rect x="11" y="11" width="6" height="6" rx="1.2" fill="currentColor" fillOpacity="0.25" />
  </Icon>
);

/** Keys: a ring and a notched bit. */
export const IconKey = (p: P) => (
  <Icon {...p}>
    <circle cx="6.5" cy="10" r="3.5" />
    <path d="M10 10h7.5M14.5 10v3M17 10v2" />
  </Icon>
);

/** People: two heads, offset. */
export const IconPeople = (p: P) => (
  <Icon {...p}>
    <circle cx="7.5" cy="7" r="2.6" />
    <path d="M2.8 16.5c.5-2.8 2.4-4.3 4.7-4.3s4.2 1.5 4.7 4.3" />
    <path d="M13 4.6a2.5 2.5 0 1 1 0 4.8M14.5 12.4c1.5.5 2.5 1.9 2.8 4.1" />
  </Icon>
);

/** Meter: a dial with a needle. */
export const IconMeter = (p: P) => (
  <Icon {...p}>
    <path d="M3.2 14.5a7 7 0 1 1 13.6 0" />
    <path d="M10 13.2 13.3 7.8" />
    <circle cx="10" cy="13.6" r="1" fill="currentColor" />
    <path d="M4.5 17h11" />
  </Icon>
);

/** Ledger: a page with ruled lines and a tick. */
export const IconLedger = (p: P) => (
  <Icon {...p}>
    <rect x="4" y="2.8" width="12" height="14.4" rx="1.6" />
    <path d="M7 7h6M7 10h6M7 13h3" />
  </Icon>
);

/** Bench: a probe trace, a square pulse. */
export const IconBench = (p: P) => (
  <Icon {...p}>
    <path d="M2.5 13h3V6h4v7h3V8.5h2.5V13h2.5" />
    <path d="M2.5 16.5h15" strokeOpacity="0.5" />
  </Icon>
);

/** Claims: a dashed bound with a falling error curve under it, and a tick. */
export const IconClaims = (p: P) => (
  <Icon {...p}>
    <path d="M2.5 6.5h15" strokeDasharray="2 2" />
    <path d="M3 3c1.5 6 4.5 10.5 9.5 12.5" />
    <path d="m12 11.5 2 2 3.5-3.8" />
  </Icon>
);

/** Simulations: a waterfall curve falling through three measured points, each with its interval tick. */
export const IconSimulations = (p: P) => (
  <Icon {...p}>
    <path d="M3 3v14h14" />
    <path d="M5 5.5c3 .5 5 3 7 6.5s3 4 4.5 4" />
    <path d="M7 4.5v3M11 8.5v3.5M14.5 12.5v2.5" />
  </Icon>
);

/** Billing: a receipt with a torn foot and a ruled total. */
export const IconBilling = (p: P) => (
  <Icon {...p}>
    <path d="M5 2.8h10v14.4l-1.7-1.2-1.6 1.2-1.7-1.2-1.7 1.2-1.6-1.2L5 17.2V2.8Z" />
    <path d="M7.5 6.5h5M7.5 9.5h5M10.5 12.5h2" />
  </Icon>
);

export const IconCopy = (p: P) => (
  <Icon {...p}>
    <rect x="7" y="7" width="9.5" height="9.5" rx="1.5" />
    <path d="M13 4.5V4.2A1.2 1.2 0 0 0 11.8 3H4.2A1.2 1.2 0 0 0 3 4.2v7.6A1.2 1.2 0 0 0 4.2 13h.3" />
  </Icon>
);

export const IconCheck = (p: P) => (
  <Icon {...p}>
    <path d="m4 10.5 3.8 3.8L16 6" />
  </Icon>
);

export const IconPlus = (p: P) => (
  <Icon {...p}>
    <path d="M10 4v12M4 10h12" />
  </Icon>
);

export const IconClose = (p: P) => (
  <Icon {...p}>
    <path d="m5 5 10 10M15 5 5 15" />
  </Icon>
);

export const IconWarn = (p: P) => (
  <Icon {...p}>
    <path d="M10 3 18 16.5H2L10 3Z" />
    <path d="M10 8v4" />
    <circle cx="10" cy="14.3" r=".6" fill="currentColor" />
  </Icon>
);

export const IconRotate = (p: P) => (
  <Icon {...p}>
    <path d="M15.5 8A6 6 0 0 0 4.6 6.5M4.5 12a6 6 0 0 0 10.9 1.5" />
    <path d="M4.3 3.2v3.5h3.5M15.7 16.8v-3.5h-3.5" />
  </Icon>
);

export const IconBan = (p: P) => (
  <Icon {...p}>
    <circle cx="10" cy="10" r="6.5" />
    <path d="m5.4 14.6 9.2-9.2" />
  </Icon>
);

export const IconMenu = (p: P) => (
  <Icon {...p}>
    <path d="M3.5 6h13M3.5 10h13M3.5 14h13" />
  </Icon>
);

export const IconExit = (p: P) => (
  <Icon {...p}>
    <path d="M8 3.5H4.8A1.3 1.3 0 0 0 3.5 4.8v10.4a1.3 1.3 0 0 0 1.3 1.3H8" />
    <path d="M12.5 6.5 16 10l-3.5 3.5M16 10H7.5" />
  </Icon>
);

export const IconDownload = (p: P) => (
  <Icon {...p}>
    <path d="M10 3.5v9M6.3 9 10 12.7 13.7 9M4 16.5h12" />
  </Icon>
);

export const IconSort = ({ dir, className = "h-3.5 w-3.5" }: { dir: false | "asc" | "desc"; className?: string }) => (
  <svg viewBox="0 0 12 12" className={className} aria-hidden="true" focusable="false">
    <path d="M6 1.5 9 5H3Z" fill="currentColor" fillOpacity={dir === "asc" ? 1 : 0.3} />
    <path d="M6 10.5 3 7h6Z" fill="currentColor" fillOpacity={dir === "desc" ? 1 : 0.3} />
  </svg>
);

export const IconPlay = (p: P) => (
  <Icon {...p}>
    <path d="M6.5 4.5v11l9-5.5-9-5.5Z" />
  </Icon>
);

export const IconMail = (p: P) => (
  <Icon {...p}>
    <rect x="2.8" y="4.5" width="14.4" height="11" rx="1.5" />
    <path d="m3.5 5.5 6.5 5 6.5-5" />
  </Icon>
);
