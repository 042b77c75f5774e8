"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useId, useState } from "react";
import { RoleBadge } from "@/components/console/badges";
import { ConfirmDialog } from "@/components/console/confirm-dialog";
import { Email } from "@/components/console/email";
import { useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { buttonQuiet, buttonQuietDanger, buttonSmall, panel, selectBase, stackBody, stackCell, stackHead, stackRow, stackTable, tableHead } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { useMe } from "@/lib/console-client/hooks";
import { queryKeys } from "@/lib/console-client/query-keys";
import { ROLES, type Invitation, type Member, type Role } from "@/lib/console-client/types";
import { InviteForm } from "./invite-form";

type Pending =
  | { kind: "role"; member: Member; role: Role }
  | { kind: "remove"; member: Member }
  | { kind: "leave"; member: Member }
  | { kind: "transfer"; member: Member }
  | { kind: "revoke-invite"; invitation: Invitation };

const who = (m: { name?: string | null; email: string }) => m.name ?? m.email;

/** Removing someone: their access ends at once; their keys are revoked too unless the owner unticks the box. */
function RemoveConfirmation({ org, member, open, onClose, onDone }: { org: string; member: Member; open: boolean; onClose: () => void; onDone: () => void }) {
  const qc = useQueryClient();
  const [revokeKeys, setRevokeKeys] = useState(true);
  const boxId = useId();
  return (
    <ConfirmDialog
      open={open}
      onClose={onClose}
      danger
      title={`Remove ${who(member)}?`}
      confirmLabel="Remove from the organisation"
      pendingLabel="Removing…"
      onConfirm={() => consoleApi.removeMember(org, member.userId, { revokeKeys })}
      onDone={() => {
        onDone();
        if (revokeKeys) void qc.invalidateQueries({ queryKey: queryKeys.keys(org) });
      }}
    >
      <p>{member.email} loses access to this organisation at once.</p>
      <div className="mt-3 flex items-start gap-2">
        <input id={boxId} type="checkbox" className="mt-1" checked={revokeKeys} onChange={(e) => setRevokeKeys(e.target.checked)} />
        <label htmlFor={boxId}>
          Also revoke every key they created. <span className="text-ink-2">Untick to keep them working, for example for a CI job they set up; you can revoke them later on the Keys page.</span>
        </label>
      </div>
    </ConfirmDialog>
  );
}

function Confirmations({ org, pending, open, onClose }: { org: string; pending: Pending | null; open: boolean; onClose: () => void }) {
  const qc = useQueryClient();
  const router = useRouter();
  const refresh = () => {
    void qc.invalidateQueries({ queryKey: queryKeys.members(org) });
    void qc.invalidateQueries({ queryKey: queryKeys.me });
  };
  // The last request stays rendered while its dialog closes, so focus goes back to the button that opened it.
  const p = pending;
  const common = { open: open && p !== null, onClose };
  if (!p) return null;
  switch (p.kind) {
    case "role":
      return (
        <ConfirmDialog
          {...common}
          key={`role-${p.member.userId}-${p.role}`}
          title={`Make ${who(p.member)} ${p.role === "owner" ? "an owner" : `a ${p.role}`}?`}
          confirmLabel="Change role"
          pendingLabel="Changing…"
          onConfirm={() => consoleApi.changeRole(org, p.member.userId, p.role)}
          onDone={refresh}
        >
          <p>
            {who(p.member)} goes from <RoleBadge role={p.member.role} /> to <RoleBadge role={p.role} />.{" "}
            {p.role === "billing" ? "Billing admins have no API keys; keys they created keep working until someone revokes them." : null}
            {p.role === "owner" ? "Owners can manage people, every key and the ledger." : null}
          </p>
        </ConfirmDialog>
      );
    case "remove":
      return <RemoveConfirmation key={`remove-${p.member.userId}`} {...common} org={org} member={p.member} onDone={refresh} />;
    case "leave":
      return (
        <ConfirmDialog
          {...common}
          key="leave"
          danger
          title="Leave this organisation?"
          confirmLabel="Leave"
          pendingLabel="Leaving…"
          onConfirm={() => consoleApi.removeMember(org, p.member.userId)}
          onDone={() => {
            void qc.invalidateQueries({ queryKey: queryKeys.me });
            router.push("/console");
          }}
        >
          <p>You lose access to its keys, usage and people. To come back you need a new invitation from an owner.</p>
        </ConfirmDialog>
      );
    case "transfer":
      return (
        <ConfirmDialog
          {...common}
          key={`transfer-${p.member.userId}`}
          title={`Hand ownership to ${who(p.member)}?`}
          confirmLabel="Transfer ownership"
          pendingLabel="Transferring…"
          onConfirm={() => consoleApi.transfer(org, p.member.userId)}
          onDone={refresh}
        >
          <p>
            {p.member.email} becomes an owner and <strong className="font-medium">you become a developer</strong>: you keep your own keys
            and the bench, but can no longer manage people, other members&apos; keys or the ledger.
          </p>
        </ConfirmDialog>
      );
    case "revoke-invite":
      return (
        <ConfirmDialog
          {...common}
          key={`invite-${p.invitation.id}`}
          danger
          title={`Withdraw the invitation to ${p.invitation.email}?`}
          confirmLabel="Withdraw invitation"
          pendingLabel="Withdrawing…"
          onConfirm={() => consoleApi.revokeInvitation(org, p.invitation.id)}
          onDone={refresh}
        >
          <p>The link in the e-mail stops working. You can invite the address again later.</p>
        </ConfirmDialog>
      );
  }
}

function MemberRow({ m, me, isOwner, onPending }: { m: Member; me: number | undefined; isOwner: boolean; onPending: (p: Pending) => void }) {
  const self = m.userId === me;
  return (
    <tr className={`border-t border-rule align-top ${stackRow}`}>
      <th scope="row" className={`px-3 py-2.5 text-left font-normal ${stackCell}`}>
        <span className="block font-medium">
          {m.name ?? m.email}
          {self ? <span className="ml-2 rounded bg-sunken px-1.5 py-px text-xs font-normal text-ink-2">you</span> : null}
        </span>
        {m.name ? <Email address={m.email} className="block text-xs text-ink-2" /> : null}
      </th>
      <td className={`px-3 py-2.5 ${stackCell}`} data-label="Role">
        {isOwner ? (
          <select
            aria-label={`Role of ${m.email}`}
            className={`${selectBase} mt-0.5 w-full max-w-xs py-1 md:mt-0 md:w-36`}
            value={m.role}
            onChange={(e) => onPending({ kind: "role", member: m, role: e.target.value as Role })}
          >
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </select>
        ) : (
          <RoleBadge role={m.role} />
        )}
      </td>
      <td className={`px-3 py-2.5 ${stackCell}`} data-label="Joined">
        <time dateTime={m.joinedAt} title={formatDateTime(m.joinedAt)}>
          {formatRelative(m.joinedAt)}
        </time>
      </td>
      <td className={`px-3 py-2 ${stackCell}`}>
        <div className="flex flex-wrap gap-1">
          {isOwner && !self && m.role !== "owner" ? (
            <button type="button" className={`${buttonQuiet} ${buttonSmall}`} onClick={() => onPending({ kind: "transfer", member: m })}>
              Transfer ownership
            </button>
          ) : null}
          {isOwner && !self ? (
            <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={() => onPending({ kind: "remove", member: m })} aria-label={`Remove ${m.email}`}>
              Remove
            </button>
          ) : null}
          {self ? (
            <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={() => onPending({ kind: "leave", member: m })}>
              Leave
            </button>
          ) : null}
        </div>
      </td>
    </tr>
  );
}

/** /console/{org}/members: everyone sees who is in; owners invite, change roles, remove and hand over ownership. */
export function MembersView() {
  const org = useCurrentOrg();
  const me = useMe();
  const isOwner = org.role === "owner";
  const members = useQuery({ queryKey: queryKeys.members(org.slug), queryFn: ({ signal }) => consoleApi.members(org.slug, signal) });
  const [pending, setPending] = useState<Pending | null>(null);
  const [asking, setAsking] = useState(false);
  const ask = (p: Pending) => {
    setPending(p);
    setAsking(true);
  };
  const myId = me.data?.user.id;

  const owners = members.data?.members.filter((m) => m.role === "owner").length ?? 0;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="People"
        title="Members and roles"
        lead={
          isOwner
            ? "Invite people, set their role, and hand over ownership. The organisation always keeps at least one owner."
            : "Who belongs to this organisation. Owners manage members and invitations."
        }
      />
      {isOwner ? <InviteForm org={org.slug} /> : null}

      <section aria-labelledby="members-heading" className="flex flex-col gap-3">
        <h2 id="members-heading" className="text-lg font-semibold">
          Members {members.data ? <span className="font-normal text-ink-2">({members.data.members.length})</span> : null}
        </h2>
        {members.isPending ? (
          <Loading label="Loading members" />
        ) : members.isError ? (
          <LoadError error={members.error} onRetry={() => void members.refetch()} what="the members" />
        ) : (
          <>
            <div className={`${panel} overflow-x-auto`}>
              <table className={`w-full border-collapse text-sm md:min-w-[36rem] ${stackTable}`}>
                <caption className="sr-only">Members of {org.name}</caption>
                <thead className={`${tableHead} ${stackHead}`}>
                  <tr>
                    <th scope="col" className="px-3 py-2 font-medium">Person</th>
                    <th scope="col" className="px-3 py-2 font-medium">Role</th>
                    <th scope="col" className="px-3 py-2 font-medium">Joined</th>
                    <th scope="col" className="px-3 py-2 font-medium"><span className="sr-only">Actions</span></th>
                  </tr>
                </thead>
                <tbody className={stackBody}>
                  {members.data.members.map((m) => (
                    <MemberRow key={m.userId} m={m} me={myId} isOwner={isOwner} onPending={ask} />
                  ))}
                </tbody>
              </table>
            </div>
            {isOwner && owners === 1 ? (
              <p className="text-sm text-ink-2">
                You are the only owner. Before you step down or leave, make someone else an owner (or transfer ownership).
              </p>
            ) : null}
          </>
        )}
      </section>

      {isOwner ? (
        <section aria-labelledby="invites-heading" className="flex flex-col gap-3">
          <h2 id="invites-heading" className="text-lg font-semibold">
            Pending invitations
          </h2>
          {members.isPending ? null : members.isError ? null : members.data.invitations.length === 0 ? (
            <Empty title="No invitations waiting">
              <p>Invitations you send appear here until they are accepted, withdrawn or run out after seven days.</p>
            </Empty>
          ) : (
            <div className={`${panel} overflow-x-auto`}>
              <table className={`w-full border-collapse text-sm md:min-w-[36rem] ${stackTable}`}>
                <caption className="sr-only">Pending invitations</caption>
                <thead className={`${tableHead} ${stackHead}`}>
                  <tr>
                    <th scope="col" className="px-3 py-2 font-medium">E-mail</th>
                    <th scope="col" className="px-3 py-2 font-medium">Role</th>
                    <th scope="col" className="px-3 py-2 font-medium">Invited by</th>
                    <th scope="col" className="px-3 py-2 font-medium">Link valid</th>
                    <th scope="col" className="px-3 py-2 font-medium"><span className="sr-only">Actions</span></th>
                  </tr>
                </thead>
                <tbody className={stackBody}>
                  {members.data.invitations.map((i) => (
                    <InvitationRow key={i.id} i={i} onRevoke={() => ask({ kind: "revoke-invite", invitation: i })} />
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </section>
      ) : null}

      <Confirmations org={org.slug} pending={pending} open={asking} onClose={() => setAsking(false)} />
    </div>
  );
}

function InvitationRow({ i, onRevoke }: { i: Invitation; onRevoke: () => void }) {
  const [expired] = useState(() => Date.parse(i.expiresAt) <= Date.now());
  return (
    <tr className={`border-t border-rule align-top ${stackRow}`}>
      <th scope="row" className={`px-3 py-2.5 text-left font-medium ${stackCell}`}>
        <Email address={i.email} />
      </th>
      <td className={`px-3 py-2.5 ${stackCell}`} data-label="Role"><RoleBadge role={i.role} /></td>
      <td className={`px-3 py-2.5 text-ink-2 ${stackCell}`} data-label="Invited by">{i.invitedBy?.email ?? "—"}</td>
      <td className={`px-3 py-2.5 ${stackCell}`} data-label="Link valid">
        <time dateTime={i.expiresAt} title={formatDateTime(i.expiresAt)} className={expired ? "text-ink-2" : undefined}>
          {expired ? `ran out ${formatRelative(i.expiresAt)}` : formatRelative(i.expiresAt)}
        </time>
      </td>
      <td className={`px-3 py-2 ${stackCell}`}>
        <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={onRevoke} aria-label={`Withdraw the invitation to ${i.email}`}>
          Withdraw
        </button>
      </td>
    </tr>
  );
}
