"use client";

import { api } from "@/lib/api";
import type { NetworkView } from "@/shared/api";
import { useMe } from "@/components/shell/useMe";
import { RefusalNote, usePermission } from "@/components/ui/Permission";
import { ComputationFields, ServerError, useComputationDraft, useStartJob } from "./ComputationForm";
import { FIELDS, KINDS } from "./computations";
import { CostLine } from "./CostLine";

/**
 * Form for one calculation (API: run) of any computation on a saved network; shows the estimate
 * before submit. A role that may not start it sees the button disabled with the reason.
 */
export function RunForm({ network, canSubmit }: { network: NetworkView; canSubmit: boolean }) {
  const me = useMe();
  const permission = usePermission("work.create");
  const draft = useComputationDraft(network);
  const { kind, computation, check, seconds } = draft;
  const issues = check.ok ? {} : check.issues;
  const { submit, serverError, onSubmit } = useStartJob(
    () => api("POST /api/v1/runs", { json: { networkId: network.id, computation } }),
    (run) => `/runs/${run.id}`,
  );
  return (
    <form aria-label="Start a calculation" className="tk-card space-y-4" onSubmit={onSubmit(check.ok)}>
      <div role="radiogroup" aria-label="Computation" className="flex flex-wrap gap-2">
        {KINDS.map((k) => (
          <button
            key={k.kind}
            type="button"
            role="radio"
            aria-checked={kind === k.kind}
            onClick={() => draft.chooseKind(k.kind)}
            className={
              `rounded-full border px-3 py-1 text-caption ` +
              `${kind === k.kind ? "border-accent bg-accent text-accent-fg" : "border-line text-fg-soft hover:border-accent"}`
            }
          >
            {k.label}
          </button>
        ))}
      </div>
      <p className="text-caption text-fg-soft">{KINDS.find((k) => k.kind === kind)?.blurb}</p>
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        <ComputationFields draft={draft} idPrefix="run." errorOf={(path) => issues[path] ?? issues[path.split(".")[0]]} hints />
      </div>
      {Object.entries(issues)
        .filter(([k]) => !FIELDS[kind].some((f) => f.path === k || f.path.split(".")[0] === k))
        .map(([k, m]) => (
          <p key={k} role="alert" className="text-caption text-danger">
            <span className="font-mono">{k}</span>: {m}
          </p>
        ))}
      <CostLine seconds={seconds} plan={me.data?.workspace?.plan} />
      <ServerError message={serverError} />
      {!canSubmit && permission.reason ? <RefusalNote id="run-refusal" reason={permission.reason} /> : null}
      <button
        type="submit"
        className="tk-btn"
        disabled={!canSubmit || !check.ok || submit.isPending}
        aria-describedby={!canSubmit && permission.reason ? "run-refusal" : undefined}
      >
        {submit.isPending ? "Submitting…" : `Run ${KINDS.find((k) => k.kind === kind)?.label.toLowerCase()}`}
      </button>
    </form>
  );
}
