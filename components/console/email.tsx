import { Fragment } from "react";

/**
 * An e-mail address that wraps only where a reader expects it: before the "@" and before each
 * dot of the domain. (overflow-wrap: anywhere would let a table column shrink until the
 * address breaks mid-name.) break-word stays as the last resort for a single overlong part.
 */
export function Email({ address, className = "" }: { address: string; className?: string }) {
  const at = address.lastIndexOf("@");
  const local = at > 0 ? address.slice(0, at) : address;
  const domain = at > 0 ? address.slice(at) : "";
  const parts = domain.split(/(?=\.)/);
  return (
    <span className={`[overflow-wrap:break-word] ${className}`}>
      {local}
      {parts.map((p, i) => (
        <Fragment key={i}>
          <wbr />
          {p}
        </Fragment>
      ))}
    </span>
  );
}
