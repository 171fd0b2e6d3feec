"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { notFound } from "next/navigation";
import { api, ApiClientError, errorText } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { computeSeconds, when } from "@/lib/units";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { KINDS } from "./computations";
import { Progress } from "./Progress";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { isEngineInput, RunResult } from "./RunResult";
import { Provenance } from "./Provenance";
import type { RunDetail } from "@/shared/api";
import { quantity } from "@/shared/quantities";

/** The inputs that set a calculation's point, in words: "E = 1.2 meV, B = 0.35 T, T = 1.5 K". */
function pointText(run: RunDetail): string {
  if (!isEngineInput(run.input)) return "";
  const c = run.input.computation as Record<string, unknown>;
  return ["energyMeV", "fieldTesla", "temperatureK"]
    .filter((k) => typeof c[k] === "number")
    .map((k) => `${quantity(k).symbol} = ${c[k]} ${quantity(k).unit}`)
    .join(", ");
}

const LIVE = new Set(["queued", "running"]);

/** One run: live progress (polled every second), cancel, then the result plots. */
export function RunView({ id }: { id: string }) {
  const me = useMe();
  const who = useMemberNames();
  const client = useQueryClient();
  const q = useQuery({
    queryKey: qk.run(id),
    queryFn: () => api("GET /api/v1/runs/{id}", { params: { id } }),
    refetchInterval: (query) => (query.state.data && !LIVE.has(query.state.data.status) ? false : 1000),
  });
  const cancel = useMutation({
    mutationFn: () => api("POST /api/v1/runs/{id}/cancel", { params: { id } }),
    onSuccess: () => client.invalidateQueries({ queryKey: qk.run(id) }),
  });
  if (q.error instanceof ApiClientError && q.error.status === 404) notFound();
  if (q.error) return <ErrorNote error={q.error} title="Could not load this calculation" />;
  if (!q.data) return <Skeleton lines={5} />;
  const run = q.data;
  const label = KINDS.find((k) => k.kind === run.kind)?.label ?? run.kind;
  const live = LIVE.has(run.status);
  const err = errorText(run.error);
  return (
    <>
      <PageHeader
        kicker="calculation"
        title={`${label}`}
        actions={
          <>
            {run.sweepId ? (
              <Link className="tk-btn-quiet" href={`/sweeps/${run.sweepId}`}>
                Scan{run.sweepPointIndex !== null ? ` (point ${run.sweepPointIndex})` : ""}
              </Link>
            ) : null}
            {run.networkId ? (
              <Link className="tk-btn-quiet" href={`/networks/${run.networkId}`}>
                Network
              </Link>
            ) : null}
            {run.status === "succeeded" ? (
              <a className="tk-btn-quiet" href={`/api/v1/runs/${run.id}/result.json`} download>
                Result JSON
              </a>
            ) : null}
            {live && canCreate(me.data?.role) ? (
              <button type="button" className="tk-btn-quiet border-danger/50 text-danger" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
                {cancel.isPending ? "Cancelling…" : "Cancel calculation"}
              </button>
            ) : null}
          </>
        }
      >
        Submitted {when(run.createdAt)} by {who(run.createdBy)} · estimated {computeSeconds(run.estimate.computeSeconds)}
        {run.computeSeconds !== null ? ` · used ${computeSeconds(run.computeSeconds)}` : ""}
      </PageHeader>
      <div className="max-w-3xl">
        <Progress
          status={run.status}
          progress={run.progress}
          startedAt={run.startedAt}
          createdAt={run.createdAt}
          finishedAt={run.finishedAt}
          label="Calculation progress"
        />
      </div>
      {cancel.error ? (
        <p role="alert" className="mt-2 text-caption text-danger">
          {(cancel.error as Error).message}
        </p>
      ) : null}
      {err ? (
        <div role="alert" className="mt-4 max-w-3xl rounded-card border border-danger/40 bg-danger-soft p-3 text-body text-danger">
          {err}
        </div>
      ) : null}
      {run.status === "succeeded" && run.result ? (
        <div className="mt-6">
          <RunResult run={run} />
        </div>
      ) : null}
      {isEngineInput(run.input) ? (
        <Provenance
          title={`${label}${pointText(run) ? ` at ${pointText(run)}` : ""}`}
          path={`/runs/${run.id}`}
          input={run.input}
          networkId={run.networkId}
          networkVersion={run.networkVersion}
          engineVersion={run.engineVersion}
          inputHash={run.inputHash}
          date={run.finishedAt ?? run.createdAt}
        />
      ) : null}
    </>
  );
}
