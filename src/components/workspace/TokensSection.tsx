"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { ErrorNote, Skeleton } from "@/components/ui/Page";
import { CardTable } from "@/components/ui/Table";
import { api } from "@/lib/api";
import { when } from "@/lib/units";
import type { TokenCreated, TokenView } from "@/shared/api";
import { ROLE_LABELS, tokenRolesFor, type Role } from "@/shared/permissions";

const tokensKey = ["tokens"] as const;
const NAME_MAX = 80;

/**
 * The signed-in member's API tokens in this group: create one with a name and a role no higher
 * than theirs (tokenRolesFor, the rule the API applies), see the secret once, list and revoke.
 */
export function TokensSection({ role, myName }: { role: Role; myName: string }) {
  const client = useQueryClient();
  const tokens = useQuery({ queryKey: tokensKey, queryFn: () => api("GET /api/v1/tokens") });
  const [created, setCreated] = useState<TokenCreated | null>(null);
  const refresh = () => void client.invalidateQueries({ queryKey: tokensKey });
  const active = tokens.data?.tokens.filter((t) => !t.revokedAt) ?? [];
  const revoked = tokens.data?.tokens.filter((t) => t.revokedAt) ?? [];
  return (
    <section aria-labelledby="tokens-h" className="space-y-4" id="tokens">
      <div>
        <h2 id="tokens-h" className="text-lead font-semibold">
          API tokens
        </h2>
        <p className="mt-1 max-w-3xl text-caption text-fg-soft">
          A token lets a script or the command line act in this group with one role, never more than yours. Send it as{" "}
          <code className="font-mono">Authorization: Bearer …</code>. These are your own tokens; each member manages theirs.
        </p>
      </div>
      <CreateToken
        role={role}
        onCreated={(t) => {
          setCreated(t);
          refresh();
        }}
      />
      {created ? <NewSecret created={created} onDone={() => setCreated(null)} /> : null}
      {tokens.error ? <ErrorNote error={tokens.error} title="Tokens could not be loaded" /> : null}
      {tokens.isPending ? <Skeleton /> : null}
      {tokens.data ? (
        active.length === 0 ? (
          <p className="text-caption text-fg-soft" data-testid="no-tokens">
            You have no active tokens in this group.
          </p>
        ) : (
          <CardTable label="Your API tokens" columns={["Name", "Starts with", "Role", "Created by", "Created", "Last used", "Actions"]}>
            {active.map((t) => (
              <TokenRow key={t.id} t={t} creator={myName} onRevoked={refresh} />
            ))}
          </CardTable>
        )
      ) : null}
      {revoked.length > 0 ? (
        <details className="text-caption text-fg-soft">
          <summary className="cursor-pointer">
            {revoked.length} revoked token{revoked.length === 1 ? "" : "s"}
          </summary>
          <ul className="mt-2 space-y-1">
            {revoked.map((t) => (
              <li key={t.id}>
                {t.name} <span className="font-mono">{t.prefix}…</span> · {t.roleLabel} · revoked {when(t.revokedAt!)}
              </li>
            ))}
          </ul>
        </details>
      ) : null}
    </section>
  );
}

function CreateToken({ role, onCreated }: { role: Role; onCreated: (t: TokenCreated) => void }) {
  const allowed = tokenRolesFor(role);
  const [name, setName] = useState("");
  const [tokenRole, setTokenRole] = useState<Role>(allowed.includes(role) ? role : allowed[0]);
  const create = useMutation({
    mutationFn: () => api("POST /api/v1/tokens", { json: { name: name.trim(), role: tokenRole } }),
    onSuccess: (t) => {
      setName("");
      onCreated(t);
    },
  });
  const nameProblem = name.trim().length > NAME_MAX ? `A name of at most ${NAME_MAX} characters.` : null;
  return (
    <form
      aria-labelledby="token-new-h"
      className="tk-card space-y-3 p-4"
      onSubmit={(e) => {
        e.preventDefault();
        if (name.trim() && !nameProblem) create.mutate();
      }}
    >
      <h3 id="token-new-h" className="text-body font-semibold">
        New token
      </h3>
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="token-name" className="tk-label">
            Name
          </label>
          <input
            id="token-name"
            className="tk-field mt-1 w-64"
            value={name}
            onChange={(e) => setName(e.target.value)}
            placeholder="e.g. laptop scan script"
            aria-describedby="token-note"
            aria-invalid={nameProblem ? true : undefined}
            autoComplete="off"
          />
        </div>
        <div>
          <label htmlFor="token-role" className="tk-label">
            Role
          </label>
          <select id="token-role" className="tk-field mt-1 w-auto" value={tokenRole} onChange={(e) => setTokenRole(e.target.value as Role)}>
            {allowed.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
                {r === "viewer" ? " (read-only)" : ""}
              </option>
            ))}
          </select>
        </div>
        <button type="submit" className="tk-btn" disabled={create.isPending || name.trim() === "" || nameProblem !== null}>
          {create.isPending ? "Creating…" : "Create token"}
        </button>
      </div>
      <p id="token-note" className={`text-caption ${nameProblem ? "text-danger" : "text-fg-faint"}`} data-testid="token-roles-note">
        {nameProblem ??
          (allowed.length === 1
            ? `Your role (${ROLE_LABELS[role]}) gives read-only tokens.`
            : role === "owner"
              ? "As an Owner you may give a token any role."
              : `Your role gives tokens with your own role (${ROLE_LABELS[role]}) or read-only ones (Viewer).`)}
      </p>
      {create.error ? <ErrorNote error={create.error} title="Token not created" /> : null}
    </form>
  );
}

function NewSecret({ created, onDone }: { created: TokenCreated; onDone: () => void }) {
  const [copied, setCopied] = useState<"yes" | "failed" | null>(null);
  return (
    <div role="status" className="space-y-2 rounded-card border border-accent/40 bg-accent-soft p-4" data-testid="token-secret">
      <p className="text-body font-semibold">
        Token “{created.token.name}” ({created.token.roleLabel}) created. Copy its secret now: it is shown only this once.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label htmlFor="token-secret-value" className="sr-only">
          Secret of the new token
        </label>
        <input
          id="token-secret-value"
          readOnly
          className="tk-field w-[36rem] max-w-full font-mono"
          value={created.secret}
          onFocus={(e) => e.currentTarget.select()}
          data-testid="token-secret-value"
        />
        <button
          type="button"
          className="tk-btn-quiet"
          onClick={() => {
            navigator.clipboard.writeText(created.secret).then(
              () => setCopied("yes"),
              () => setCopied("failed"),
            );
          }}
        >
          Copy
        </button>
        <button type="button" className="tk-btn-quiet" onClick={onDone}>
          Done
        </button>
      </div>
      {copied ? (
        <p className="text-caption text-fg-soft" data-testid="token-copied">
          {copied === "yes" ? "Copied to the clipboard." : "The browser did not allow copying; select the secret and copy it yourself."}
        </p>
      ) : null}
    </div>
  );
}

function TokenRow({ t, creator, onRevoked }: { t: TokenView; creator: string; onRevoked: () => void }) {
  const [confirming, setConfirming] = useState(false);
  const revoke = useMutation({ mutationFn: () => api("DELETE /api/v1/tokens/{id}", { params: { id: t.id } }), onSuccess: onRevoked });
  return (
    <tr className="border-b border-line align-top last:border-0" data-token={t.name}>
      <td className="px-3 py-2">{t.name}</td>
      <td className="px-3 py-2 font-mono text-caption">{t.prefix}…</td>
      <td className="px-3 py-2">{t.roleLabel}</td>
      <td className="px-3 py-2">{creator}</td>
      <td className="px-3 py-2 tk-num text-caption">{when(t.createdAt)}</td>
      <td className="px-3 py-2 tk-num text-caption">{t.lastUsedAt ? when(t.lastUsedAt) : "never"}</td>
      <td className="px-3 py-2">
        {confirming ? (
          <div role="group" aria-label={`Revoke ${t.name}?`} className="space-y-1">
            <p className="text-caption">Scripts using it stop working at once.</p>
            <div className="flex gap-2">
              <button type="button" className="tk-btn-quiet text-danger" onClick={() => revoke.mutate()} disabled={revoke.isPending}>
                {revoke.isPending ? "Revoking…" : "Yes, revoke"}
              </button>
              <button type="button" className="tk-btn-quiet" onClick={() => setConfirming(false)} disabled={revoke.isPending}>
                Keep
              </button>
            </div>
          </div>
        ) : (
          <button type="button" className="tk-btn-quiet" onClick={() => setConfirming(true)} aria-label={`Revoke ${t.name}`}>
            Revoke
          </button>
        )}
        {revoke.error ? (
          <p role="alert" className="mt-1 text-caption text-danger">
            {revoke.error.message}
          </p>
        ) : null}
      </td>
    </tr>
  );
}
