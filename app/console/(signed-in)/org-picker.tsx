"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect } from "react";
import { RoleBadge } from "@/components/console/badges";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { useMe } from "@/lib/console-client/hooks";

/** /console: straight into the user's first organisation, or the empty state when there is none. */
export function OrgPicker() {
  const me = useMe();
  const router = useRouter();
  const first = me.data?.orgs[0];

  useEffect(() => {
    if (first) router.replace(`/console/${first.slug}`);
  }, [first, router]);

  if (me.isPending) return <Loading label="Finding your organisations" />;
  if (me.isError) return <LoadError error={me.error} onRetry={() => void me.refetch()} what="your organisations" />;
  if (!first) {
    return (
      <div className="mx-auto max-w-2xl pt-6">
        <h1 className="text-2xl font-semibold tracking-tight">Welcome to the console</h1>
        <div className="mt-6">
          <Empty title="No organisation yet — ask an owner to invite you">
            <p>
              Everything in the console belongs to an organisation: its keys, its people and its usage. An owner of one can
              invite <strong className="font-medium text-ink">{me.data.user.email}</strong> from their People section; the
              invitation arrives by e-mail with a link that brings you back here.
            </p>
          </Empty>
        </div>
      </div>
    );
  }
  return (
    <div role="status" className="pt-6">
      <p className="text-ink-2">
        Opening{" "}
        <Link href={`/console/${first.slug}`} className="font-medium">
          {first.name}
        </Link>{" "}
        <RoleBadge role={first.role} />…
      </p>
    </div>
  );
}
