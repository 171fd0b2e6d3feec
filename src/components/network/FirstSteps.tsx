"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { api } from "@/lib/api";
import { usePermission } from "@/components/ui/Permission";
import { EXAMPLE_NETWORK, isExampleNetwork } from "@/shared/networks";

/**
 * The first-steps card of a group that has not calculated anything yet: open the example network
 * (every new group gets one, src/shared/networks.ts), run a first calculation with its estimate
 * shown before it starts, then a scan. Gone once the group has its first calculation.
 */
export function FirstSteps() {
  const create = usePermission("work.create");
  const runs = useQuery({ queryKey: ["runs", { limit: 1, firstSteps: true }], queryFn: () => api("GET /api/v1/runs", { query: { limit: 1 } }) });
  const networks = useQuery({ queryKey: ["networks", { limit: 50, firstSteps: true }], queryFn: () => api("GET /api/v1/networks", { query: { limit: 50 } }) });
  if (!create.allowed || !runs.data || !networks.data || runs.data.runs.length > 0) return null;
  const example = networks.data.networks.find((n) => isExampleNetwork(n.name));
  return (
    <section aria-labelledby="first-steps-h" className="tk-card mb-6 space-y-3" data-testid="first-steps">
      <h2 id="first-steps-h" className="text-lead font-semibold">
        First steps
      </h2>
      <ol className="list-decimal space-y-1.5 pl-5 text-body text-fg-soft">
        <li>
          {example ? (
            <>
              Open the example network,{" "}
              <Link href={`/networks/${example.id}`} className="text-accent underline">
                {example.name}
              </Link>
              : an invented starting point, drawn as you change it.
            </>
          ) : (
            <>
              <Link href="/networks/new" className="text-accent underline">
                Describe a network
              </Link>{" "}
              (the example this group started with, “{EXAMPLE_NETWORK.name}”, is gone).
            </>
          )}
        </li>
        <li>
          {example ? (
            <Link href={`/networks/${example.id}#run`} className="text-accent underline" data-testid="first-calculation">
              Run your first calculation
            </Link>
          ) : (
            "Run your first calculation"
          )}
          : a conductance at one energy takes a few compute-seconds. The estimate is shown before it starts.
        </li>
        <li>Then build a scan over the magnetic field, or upload a measured curve under Datasets and fit the model to it.</li>
      </ol>
      <p className="text-caption text-fg-faint">Results are predictions of a phenomenological model, not measurements.</p>
    </section>
  );
}
