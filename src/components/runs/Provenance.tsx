"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useState, useSyncExternalStore } from "react";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { useMe } from "@/components/shell/useMe";
import { citation, MODEL_CAUTION } from "@/shared/exports";
import { inputRows } from "@/shared/inputs";

/** The page's absolute URL (read after mounting: the server does not know the origin the browser used). */
const noSubscription = () => () => {};
function usePageUrl(path: string): string {
  const origin = useSyncExternalStore(
    noSubscription,
    () => window.location.origin,
    () => "",
  );
  return `${origin}${path}`;
}

/** Where a result came from: its inputs in words with units, the network, the engine and the input hash; then its citation with a copy button. */
export function Provenance({
  title,
  path,
  input,
  skip = [],
  extra = [],
  networkId,
  networkVersion,
  networkName,
  engineVersion,
  inputHash,
  date,
}: {
  title: string;
  /** The result page's path, e.g. /runs/{id}. */
  path: string;
  input: { network?: unknown; computation?: unknown };
  /** Input keys shown elsewhere (a scan's axes). */
  skip?: string[];
  /** Rows to show first (a scan's axes). */
  extra?: { label: string; value: string }[];
  networkId: string | null;
  networkVersion: number | null;
  /** Known already (a scan's answer names it); otherwise read from the network. */
  networkName?: string | null;
  engineVersion: string | null;
  inputHash: string;
  /** ISO time the result was made (finished, else submitted). */
  date: string;
}) {
  const me = useMe();
  const net = useQuery({
    queryKey: [...qk.network(networkId ?? ""), "provenance"],
    queryFn: () => api("GET /api/v1/networks/{id}", { params: { id: networkId ?? "" } }),
    enabled: Boolean(networkId) && !networkName,
    staleTime: 60_000,
  });
  const url = usePageUrl(path);
  const name = networkName ?? net.data?.name ?? null;
  const versionId = net.data?.versions?.find((v) => v.version === networkVersion)?.versionId;
  const rows = [...extra, ...inputRows(input, skip).map((r) => ({ label: r.label, value: r.value }))];
  const group = me.data?.workspace.name ?? "Triskel group";
  const text = citation({ title, group, date, url, engineVersion, inputHash });
  const [copied, setCopied] = useState<"idle" | "done" | "failed">("idle");
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(text);
      setCopied("done");
    } catch {
      setCopied("failed");
    }
  };
  return (
    <section className="mt-8 grid gap-6 xl:grid-cols-2" aria-label="Inputs and provenance">
      <div className="tk-card space-y-3" data-testid="inputs-block">
        <h2 className="text-lead font-semibold">Inputs and provenance</h2>
        <dl className="grid grid-cols-[minmax(0,1fr)_minmax(0,1fr)] gap-x-4 gap-y-1 text-caption">
          <div className="contents">
            <dt className="text-fg-faint">Network</dt>
            <dd data-testid="provenance-network">
              {networkId ? (
                <>
                  <Link className="underline" href={`/networks/${networkId}`}>
                    {name ?? "saved network"}
                  </Link>
                  {networkVersion !== null ? `, version ${networkVersion}` : ""}
                  {versionId ? <span className="block font-mono text-fg-faint">version id {versionId}</span> : null}
                </>
              ) : (
                "given inline (not a saved network)"
              )}
            </dd>
          </div>
          <div className="contents">
            <dt className="text-fg-faint">Engine version</dt>
            <dd className="font-mono" data-testid="provenance-engine">
              {engineVersion ?? "not recorded yet"}
            </dd>
          </div>
          <div className="contents">
            <dt className="text-fg-faint">Input hash (sha256)</dt>
            <dd className="break-all font-mono" data-testid="provenance-hash">
              {inputHash}
            </dd>
          </div>
          {rows.map((r, i) => (
            <div key={`${r.label}-${i}`} className="contents">
              <dt className="text-fg-faint">{r.label}</dt>
              <dd className="break-words font-mono tk-num">{r.value}</dd>
            </div>
          ))}
        </dl>
      </div>
      <div className="tk-card space-y-3 self-start" data-testid="cite-block">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2 className="text-lead font-semibold">Cite this result</h2>
          <button type="button" className="tk-btn-quiet" onClick={copy} data-testid="cite-copy">
            {copied === "done" ? "Copied" : "Copy citation"}
          </button>
        </div>
        <pre className="whitespace-pre-wrap break-all rounded-card bg-surface-sunk p-3 font-mono text-caption" data-testid="cite-text">
          {text}
        </pre>
        {copied === "failed" ? (
          <p role="alert" className="text-caption text-danger">
            The browser refused the clipboard; select the text above and copy it.
          </p>
        ) : null}
        <p className="text-caption text-fg-faint">{MODEL_CAUTION}</p>
      </div>
    </section>
  );
}
