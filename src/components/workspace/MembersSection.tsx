"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { ErrorNote, Skeleton } from "@/components/ui/Page";
import { CardTable } from "@/components/ui/Table";
import { membersQuery } from "@/components/shell/useMemberNames";
import { api, ApiClientError } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { when } from "@/lib/units";
import type { InvitationView, MemberView, SeatUse } from "@/shared/api";
import { can, memberRolesFor, ROLE_LABELS, ROLES, rolesAllowed, type Role } from "@/shared/permissions";

const roleList = (roles: readonly Role[]) => roles.map((r) => ROLE_LABELS[r]).join(" and ");

/**
 * The group's members, its open invitations and its seats. What the signed-in role may do comes
 * from the permissions table the API enforces (src/shared/permissions.ts): Owners invite, remove
 * and change roles; Billing admins fill and free Researcher and Viewer seats; others read.
 */
export function MembersSection({ role, myUserId, kind }: { role: Role; myUserId: string; kind: "personal" | "lab" }) {
  const client = useQueryClient();
  const members = useQuery(membersQuery);
  const refresh = () => {
    void client.invalidateQueries({ queryKey: qk.members });
    void client.invalidateQueries({ queryKey: ["billing"] });
  };
  const mayChangeRoles = can(role, "members.manage");
  const touchable = memberRolesFor(role);
  const managesSeats = touchable.length > 0;
  const owners = members.data?.members.filter((m) => m.role === "owner").length ?? 0;

  return (
    <section aria-labelledby="members-h" className="space-y-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="members-h" className="text-lead font-semibold">
          Members
        </h2>
        {members.data?.seats ? <SeatLine seats={members.data.seats} mayAddSeats={can(role, "seats.manage")} /> : null}
      </div>
      {!managesSeats ? (
        <p className="text-caption text-fg-soft" data-testid="members-read-only">
          Your role ({ROLE_LABELS[role]}) reads the member list. {roleList(rolesAllowed("members.manage"))}s invite, remove and change roles;{" "}
          {roleList(rolesAllowed("members.seats").filter((r) => !rolesAllowed("members.manage").includes(r)))}s invite and remove Researchers and Viewers.
        </p>
      ) : null}
      {members.error ? <ErrorNote error={members.error} title="Members could not be loaded" /> : null}
      {!members.data && !members.error ? <Skeleton /> : null}
      {members.data ? (
        <CardTable label="Members" columns={managesSeats ? ["Member", "Role", "Joined", "Actions"] : ["Member", "Role", "Joined"]}>
          {members.data.members.map((m) => (
            <MemberRow
              key={m.userId}
              m={m}
              isMe={m.userId === myUserId}
              onlyOwner={m.role === "owner" && owners <= 1}
              mayChangeRoles={mayChangeRoles}
              touchable={touchable}
              showActions={managesSeats}
              onChanged={refresh}
            />
          ))}
        </CardTable>
      ) : null}
      {managesSeats && kind === "lab" ? <InviteForm touchable={touchable} mayAddSeats={can(role, "seats.manage")} onSent={refresh} /> : null}
      {managesSeats && kind === "personal" ? (
        <p className="text-caption text-fg-soft" data-testid="personal-note">
          A personal group has one member, you. Invite people into a lab group instead.
        </p>
      ) : null}
      {managesSeats && kind === "lab" && members.data?.invitations ? (
        <Invitations list={members.data.invitations} touchable={touchable} onChanged={refresh} />
      ) : null}
    </section>
  );
}

function SeatLine({ seats, mayAddSeats }: { seats: SeatUse; mayAddSeats: boolean }) {
  const taken = seats.members + seats.pending;
  const text =
    seats.plan === "lab"
      ? `${taken} of ${seats.seats} seats taken (${seats.members} member${seats.members === 1 ? "" : "s"}, ${seats.pending} open invitation${seats.pending === 1 ? "" : "s"})`
      : `Free plan: ${seats.limit} member`;
  return (
    <p className="text-caption text-fg-soft" data-testid="seat-use">
      {text}
      {mayAddSeats ? (
        <>
          {" · "}
          <Link href="/billing" className="text-accent underline">
            {seats.plan === "lab" ? "Change seats on the Billing page" : "Move to the Lab plan on the Billing page"}
          </Link>
        </>
      ) : null}
    </p>
  );
}

function MemberRow({
  m,
  isMe,
  onlyOwner,
  mayChangeRoles,
  touchable,
  showActions,
  onChanged,
}: {
  m: MemberView;
  isMe: boolean;
  onlyOwner: boolean;
  mayChangeRoles: boolean;
  touchable: Role[];
  showActions: boolean;
  onChanged: () => void;
}) {
  const [draftRole, setDraftRole] = useState<Role>(m.role);
  const [confirming, setConfirming] = useState(false);
  const who = m.name || m.email;
  const change = useMutation({
    mutationFn: (r: Role) => api("PATCH /api/v1/workspace/members/{userId}", { params: { userId: m.userId }, json: { role: r } }),
    onSuccess: onChanged,
  });
  const remove = useMutation({
    mutationFn: () => api("DELETE /api/v1/workspace/members/{userId}", { params: { userId: m.userId } }),
    onSuccess: () => {
      setConfirming(false);
      onChanged();
    },
  });
  const mayRemove = touchable.includes(m.role) && !onlyOwner && !isMe;
  const whyNotRemove = isMe
    ? "This is you."
    : !touchable.includes(m.role)
      ? `Only an Owner removes ${ROLE_LABELS[m.role]}s.`
      : "The only Owner stays; make another member Owner first.";
  const roleLocked = onlyOwner ? "The only Owner keeps the role; make another member Owner first." : null;
  return (
    <tr className="border-b border-line align-top last:border-0" data-member={m.email}>
      <td className="px-3 py-2">
        {who} {m.name ? <span className="text-caption text-fg-faint">{m.email}</span> : null}
        {isMe ? <span className="ml-1 text-caption text-fg-faint">(you)</span> : null}
      </td>
      <td className="px-3 py-2">
        {mayChangeRoles && !roleLocked ? (
          <form
            className="flex flex-wrap items-center gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              change.mutate(draftRole);
            }}
          >
            <label className="sr-only" htmlFor={`role-${m.userId}`}>
              Role of {who}
            </label>
            <select id={`role-${m.userId}`} className="tk-field w-44" value={draftRole} onChange={(e) => setDraftRole(e.target.value as Role)}>
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
            {draftRole !== m.role ? (
              <button type="submit" className="tk-btn-quiet" disabled={change.isPending}>
                {change.isPending ? "Saving…" : "Save role"}
              </button>
            ) : null}
          </form>
        ) : (
          <>
            {m.roleLabel}
            {mayChangeRoles && roleLocked ? <p className="text-caption text-fg-faint">{roleLocked}</p> : null}
          </>
        )}
        {change.error ? (
          <p role="alert" className="mt-1 text-caption text-danger">
            {change.error.message}
          </p>
        ) : null}
        {change.isSuccess && draftRole === m.role ? (
          <p role="status" className="mt-1 text-caption text-fg-soft">
            Role changed.
          </p>
        ) : null}
      </td>
      <td className="px-3 py-2 tk-num text-caption">{when(m.joinedAt)}</td>
      {showActions ? (
        <td className="px-3 py-2">
          {!mayRemove ? (
            <span className="text-caption text-fg-faint">{whyNotRemove}</span>
          ) : confirming ? (
            <div role="group" aria-label={`Remove ${who}?`} className="space-y-1">
              <p className="text-caption">Remove {who} from the group? Their API tokens stop working; their work stays.</p>
              <div className="flex gap-2">
                <button type="button" className="tk-btn-quiet text-danger" onClick={() => remove.mutate()} disabled={remove.isPending}>
                  {remove.isPending ? "Removing…" : `Yes, remove ${who}`}
                </button>
                <button type="button" className="tk-btn-quiet" onClick={() => setConfirming(false)} disabled={remove.isPending}>
                  Keep
                </button>
              </div>
            </div>
          ) : (
            <button type="button" className="tk-btn-quiet" onClick={() => setConfirming(true)} aria-label={`Remove ${who}`}>
              Remove
            </button>
          )}
          {remove.error ? (
            <p role="alert" className="mt-1 text-caption text-danger">
              {remove.error.message}
            </p>
          ) : null}
        </td>
      ) : null}
    </tr>
  );
}

/** An invitation refused for want of a seat (402): every Lab seat is taken (details.reason "seats_full") or the Free plan's one member. */
const needsSeat = (e: unknown): boolean => e instanceof ApiClientError && e.status === 402;
const isSeatsFull = (e: unknown): boolean => needsSeat(e) && ((e as ApiClientError).details as { reason?: string } | undefined)?.reason === "seats_full";

function InviteForm({ touchable, mayAddSeats, onSent }: { touchable: Role[]; mayAddSeats: boolean; onSent: () => void }) {
  const [email, setEmail] = useState("");
  const [inviteRole, setInviteRole] = useState<Role>(touchable.includes("researcher") ? "researcher" : touchable[0]);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const send = useMutation({
    mutationFn: () => api("POST /api/v1/workspace/members", { json: { email: email.trim(), role: inviteRole } }),
    onSuccess: (r) => {
      setSentTo(r.invitation.email);
      setEmail("");
      onSent();
    },
  });
  const emailProblem = email.trim() !== "" && !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email.trim()) ? "Enter an e-mail address such as name@lab.example." : null;
  return (
    <form
      aria-labelledby="invite-h"
      className="tk-card space-y-3 p-4"
      onSubmit={(e) => {
        e.preventDefault();
        setSentTo(null);
        if (email.trim() && !emailProblem) send.mutate();
      }}
    >
      <h3 id="invite-h" className="text-body font-semibold">
        Invite someone
      </h3>
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="invite-email" className="tk-label">
            E-mail address
          </label>
          <input
            id="invite-email"
            type="email"
            className="tk-field mt-1 w-72"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            aria-invalid={emailProblem ? true : undefined}
            aria-describedby="invite-note"
            autoComplete="off"
          />
        </div>
        <div>
          <label htmlFor="invite-role" className="tk-label">
            Role
          </label>
          <select id="invite-role" className="tk-field mt-1 w-auto" value={inviteRole} onChange={(e) => setInviteRole(e.target.value as Role)}>
            {touchable.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </div>
        <button type="submit" className="tk-btn" disabled={send.isPending || email.trim() === "" || emailProblem !== null}>
          {send.isPending ? "Sending…" : "Send invitation"}
        </button>
      </div>
      <p id="invite-note" className={`text-caption ${emailProblem ? "text-danger" : "text-fg-faint"}`}>
        {emailProblem ??
          (touchable.length < ROLES.length
            ? `Your role invites ${roleList(touchable)}s; an Owner invites Owners and Billing admins. Each open invitation holds a seat until it is accepted, revoked or expires.`
            : "The invitation link arrives by e-mail. Each open invitation holds a seat until it is accepted, revoked or expires.")}
      </p>
      {sentTo ? (
        <p role="status" className="text-caption text-accent-strong" data-testid="invite-sent">
          Invitation sent to {sentTo}.
        </p>
      ) : null}
      {send.error ? (
        <div role="alert" className="rounded-card border border-danger/40 bg-danger-soft p-3 text-body text-danger" data-testid="invite-error">
          <p className="font-semibold">{isSeatsFull(send.error) ? "Every seat is taken" : "Invitation not sent"}</p>
          <p className="mt-1">{send.error.message}</p>
          {needsSeat(send.error) ? (
            mayAddSeats ? (
              <p className="mt-1">
                <Link href="/billing" className="underline">
                  {isSeatsFull(send.error) ? "Add a seat on the Billing page" : "Move to the Lab plan on the Billing page"}
                </Link>
                , then invite again.
              </p>
            ) : (
              <p className="mt-1">Ask an Owner or Billing admin to add a seat.</p>
            )
          ) : null}
        </div>
      ) : null}
    </form>
  );
}

function Invitations({ list, touchable, onChanged }: { list: InvitationView[]; touchable: Role[]; onChanged: () => void }) {
  const pending = list.filter((i) => i.status === "pending");
  const [resentTo, setResentTo] = useState<string | null>(null);
  return (
    <div className="space-y-2">
      <h3 className="text-body font-semibold">Open invitations</h3>
      {resentTo ? (
        <p role="status" className="text-caption text-fg-soft" data-testid="invite-resent">
          A new link was sent to {resentTo}; the old one no longer works.
        </p>
      ) : null}
      {pending.length === 0 ? (
        <p className="text-caption text-fg-soft" data-testid="no-invitations">
          No open invitations.
        </p>
      ) : (
        <CardTable label="Open invitations" columns={["E-mail", "Role", "Sent", "Expires", "Actions"]}>
          {pending.map((i) => (
            <InvitationRow
              key={i.id}
              i={i}
              mayTouch={touchable.includes(i.role)}
              onChanged={onChanged}
              onResent={() => {
                setResentTo(i.email);
                onChanged();
              }}
            />
          ))}
        </CardTable>
      )}
    </div>
  );
}

function InvitationRow({ i, mayTouch, onChanged, onResent }: { i: InvitationView; mayTouch: boolean; onChanged: () => void; onResent: () => void }) {
  const resend = useMutation({ mutationFn: () => api("POST /api/v1/workspace/members", { json: { email: i.email, role: i.role } }), onSuccess: onResent });
  const revoke = useMutation({ mutationFn: () => api("DELETE /api/v1/workspace/invitations/{id}", { params: { id: i.id } }), onSuccess: onChanged });
  const error = resend.error ?? revoke.error;
  return (
    <tr className="border-b border-line last:border-0" data-invitation={i.email}>
      <td className="px-3 py-2">{i.email}</td>
      <td className="px-3 py-2">{i.roleLabel}</td>
      <td className="px-3 py-2 tk-num text-caption">{when(i.createdAt)}</td>
      <td className="px-3 py-2 tk-num text-caption">{when(i.expiresAt)}</td>
      <td className="px-3 py-2">
        {mayTouch ? (
          <div className="flex flex-wrap gap-2">
            <button
              type="button"
              className="tk-btn-quiet"
              onClick={() => resend.mutate()}
              disabled={resend.isPending || revoke.isPending}
              aria-label={`Resend the invitation to ${i.email}`}
              title="Sends a new link; the old one stops working"
            >
              {resend.isPending ? "Sending…" : "Resend"}
            </button>
            <button
              type="button"
              className="tk-btn-quiet"
              onClick={() => revoke.mutate()}
              disabled={resend.isPending || revoke.isPending}
              aria-label={`Revoke the invitation to ${i.email}`}
            >
              {revoke.isPending ? "Revoking…" : "Revoke"}
            </button>
          </div>
        ) : (
          <span className="text-caption text-fg-faint">Only an Owner changes {i.roleLabel} invitations.</span>
        )}
        {error ? (
          <p role="alert" className="mt-1 text-caption text-danger">
            {error.message}
          </p>
        ) : null}
      </td>
    </tr>
  );
}
