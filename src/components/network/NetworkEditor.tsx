"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useDeferredValue, useMemo, useState, useSyncExternalStore } from "react";
import { api, ApiClientError } from "@/lib/api";
import type { NetworkView } from "@/shared/api";
import { validateNetwork, type Issues } from "@/lib/engineClient";
import { qk } from "@/lib/queryKeys";
import { checkTriple } from "@/lib/ternary";
import { GRAPHENE_LATTICE_NM, periodFromTwistNm, twistFromPeriodDegrees } from "@/engine/browser";
import { num } from "@/lib/units";
import { Field, NumberInput, Select } from "@/components/ui/Field";
import { useMe } from "@/components/shell/useMe";
import { RefusalNote, UpgradeHint, usePermission } from "@/components/ui/Permission";
import { PLANS } from "@/shared/plans";
import { defaultNetwork, linkLengthNm, setPath, shapeOf, switchLattice, type NetworkDraft } from "./draft";
import { NetworkDrawing } from "./NetworkDrawing";
import { TernaryDiagram } from "./TernaryDiagram";

interface Props {
  initial?: NetworkView;
  canEdit: boolean;
}

/**
 * The network form and its live drawing. Every keystroke re-validates with the engine's schema
 * (the one the API uses) and redraws; messages sit under the field they concern.
 */
/** True on the client, false in the server's HTML: nothing to subscribe to. */
const noSubscription = () => () => {};

export function NetworkEditor({ initial, canEdit }: Props) {
  const router = useRouter();
  const client = useQueryClient();
  const [name, setName] = useState(initial?.name ?? "");
  const [draft, setDraft] = useState<NetworkDraft>(() => (initial?.network as NetworkDraft) ?? defaultNetwork());
  const [valley, setValley] = useState<"K" | "K'">("K");
  const [serverIssues, setServerIssues] = useState<Issues>({});
  const [serverError, setServerError] = useState<string | null>(null);
  const [showJson, setShowJson] = useState(false);

  const me = useMe();
  // Plan-dependent text only after mount, so the server's HTML and the first client render agree.
  const mounted = useSyncExternalStore(
    noSubscription,
    () => true,
    () => false,
  );
  const planId = mounted ? me.data?.workspace?.plan : undefined;
  const plan = PLANS[planId ?? "free"];
  const isOverPlan = (v: unknown) => Boolean(planId) && typeof v === "number" && v > plan.maxCellsPerSide;
  const overPlan = (v: unknown) =>
    isOverPlan(v)
      ? `the ${plan.label} plan allows up to ${plan.maxCellsPerSide} cells per side; the drawing still shows it, but a network this large cannot be saved on ${plan.label}`
      : undefined;
  const sizeOverPlan = isOverPlan(draft.size?.columns) || isOverPlan(draft.size?.rows);
  const permission = usePermission("work.create");
  const triangular = draft.lattice !== "square";
  const scaleMode: "twist" | "period" = draft.periodNm !== undefined ? "period" : "twist";
  const set = (path: string, value: unknown) => {
    setServerIssues({});
    setDraft((d) => setPath(d, path, value));
  };

  const validation = useMemo(() => validateNetwork(draft), [draft]);
  const issues: Issues = { ...(validation.ok ? {} : validation.issues), ...serverIssues };
  const node = draft.node ?? {};
  const usesProbabilities = triangular && node.matrix === undefined;
  const triple = { forward: Number(node.forward), left: Number(node.left), right: Number(node.right) };
  const tripleVerdict = usesProbabilities ? checkTriple(triple) : ({ ok: true } as const);
  // One message for the node triple: ours explains the geometry, the engine's is the authority.
  const nodeMessage = !tripleVerdict.ok ? tripleVerdict.message : (issues["node"] ?? issues["node.forward"] ?? issues["node.left"] ?? issues["node.right"]);
  const err = (path: string) => issues[path];

  const deferredDraft = useDeferredValue(draft);
  // the square network has no valleys: it is drawn as it runs
  const shape = useMemo(() => shapeOf(deferredDraft, triangular ? valley : "K"), [deferredDraft, triangular, valley]);
  const l = linkLengthNm(draft);

  const save = useMutation({
    mutationFn: async () => {
      const body = { name: name.trim(), network: validation.ok ? validation.data : draft };
      if (initial?.id) return api("PUT /api/v1/networks/{id}", { params: { id: initial.id }, json: body });
      return api("POST /api/v1/networks", { json: body });
    },
    onSuccess: async (saved) => {
      await client.invalidateQueries({ queryKey: ["networks"] });
      client.setQueryData(qk.network(saved.id), saved);
      if (!initial?.id) router.push(`/networks/${saved.id}`);
    },
    onError: (e) => {
      if (e instanceof ApiClientError) {
        const map: Issues = {};
        for (const i of e.issues) map[i.field.replace(/^network\./, "")] = i.message;
        setServerIssues(map);
        setServerError(e.message);
      } else setServerError(String(e));
    },
  });

  const nameError = name.trim() === "" ? "Give the network a name (shown in lists and on results)." : undefined;
  const canSave = canEdit && validation.ok && tripleVerdict.ok && !nameError && !sizeOverPlan && !save.isPending;

  return (
    <div className="grid gap-6 xl:grid-cols-[minmax(22rem,26rem)_1fr]">
      <form
        aria-label="Network description"
        className="space-y-5"
        onSubmit={(e) => {
          e.preventDefault();
          setServerError(null);
          if (canSave) save.mutate();
        }}
      >
        <fieldset className="tk-card space-y-3" disabled={!canEdit}>
          <legend className="px-1 text-caption font-semibold uppercase tracking-[0.14em] text-fg-faint">Network</legend>
          <Field id="name" label="Name" error={name !== "" || initial ? nameError : undefined}>
            <input
              id="name"
              className="tk-field"
              value={name}
              onChange={(e) => setName(e.target.value)}
              placeholder="e.g. 0.11° clean, 12 × 8"
              aria-invalid={nameError && name !== "" ? true : undefined}
            />
          </Field>
          <div className="grid grid-cols-2 gap-3">
            <Field id="lattice" label="Lattice" error={err("lattice")} hint={triangular ? "domain walls of a twisted bilayer" : "quantum Hall transition"}>
              <Select
                id="lattice"
                value={draft.lattice ?? "triangular"}
                options={LATTICE_OPTIONS}
                onChange={(v) => setDraft((d) => switchLattice(d, v as "triangular" | "square"))}
              />
            </Field>
            <Field
              id="transverse"
              label="Transverse boundary"
              error={err("transverse")}
              hint={draft.transverse === "open" ? "two edges" : "a cylinder, no edges"}
            >
              <Select id="transverse" value={draft.transverse ?? "periodic"} options={TRANSVERSE_OPTIONS} onChange={(v) => set("transverse", v)} />
            </Field>
            <Field
              id="size.columns"
              label="Columns"
              unit="cells"
              error={err("size.columns") ?? err("size") ?? overPlan(draft.size?.columns)}
              hint={planId ? `along a1, lead to lead; up to ${plan.maxCellsPerSide} on ${plan.label}` : "along a1, lead to lead"}
            >
              <NumberInput id="size.columns" integer value={draft.size?.columns} onChange={(v) => set("size.columns", v)} error={err("size.columns")} />
            </Field>
            <Field
              id="size.rows"
              label="Rows"
              unit="cells"
              error={err("size.rows") ?? overPlan(draft.size?.rows)}
              hint={planId ? `across the sample; up to ${plan.maxCellsPerSide} on ${plan.label}` : "across the sample"}
            >
              <NumberInput id="size.rows" integer value={draft.size?.rows} onChange={(v) => set("size.rows", v)} error={err("size.rows")} />
            </Field>
          </div>
        </fieldset>

        <fieldset className="tk-card space-y-3" disabled={!canEdit}>
          <legend className="px-1 text-caption font-semibold uppercase tracking-[0.14em] text-fg-faint">Scale and modes</legend>
          {/* The square network has no moiré: its scale is the link length alone, with no twist angle, channels per link or valleys. */}
          {triangular ? (
            <div role="radiogroup" aria-label="Scale given as" className="flex gap-4 text-caption">
              {(["twist", "period"] as const).map((m) => (
                <label key={m} className="flex items-center gap-1.5">
                  <input
                    type="radio"
                    name="scale-mode"
                    checked={scaleMode === m}
                    onChange={() =>
                      setDraft((d) => {
                        const out = { ...d };
                        const len = linkLengthNm(d) ?? 128;
                        if (m === "period") {
                          delete out.twistDegrees;
                          out.periodNm = Number(len.toFixed(2));
                        } else {
                          delete out.periodNm;
                          out.twistDegrees = Number(twistFromPeriodDegrees(len).toFixed(4));
                        }
                        return out;
                      })
                    }
                  />
                  {m === "twist" ? "Twist angle" : "Moiré period"}
                </label>
              ))}
            </div>
          ) : null}
          {!triangular ? (
            <Field id="periodNm" label="Link length l" unit="nm" error={err("periodNm") ?? err("twistDegrees")} hint="length of one link between two nodes">
              <NumberInput id="periodNm" value={draft.periodNm} onChange={(v) => set("periodNm", v)} error={err("periodNm")} />
            </Field>
          ) : scaleMode === "twist" ? (
            <Field
              id="twistDegrees"
              label="Twist angle θ"
              unit="degrees"
              error={err("twistDegrees")}
              hint={
                typeof draft.twistDegrees === "number" && draft.twistDegrees > 0 ? (
                  <span data-testid="scale-conversion">
                    l = a / (2 sin(θ/2)) = {num(periodFromTwistNm(draft.twistDegrees), 4)} nm (a = {GRAPHENE_LATTICE_NM} nm)
                  </span>
                ) : (
                  `l = a / (2 sin(θ/2)), a = ${GRAPHENE_LATTICE_NM} nm`
                )
              }
            >
              <NumberInput id="twistDegrees" value={draft.twistDegrees} onChange={(v) => set("twistDegrees", v)} error={err("twistDegrees")} />
            </Field>
          ) : (
            <Field
              id="periodNm"
              label="Moiré period l (link length)"
              unit="nm"
              error={err("periodNm")}
              hint={
                typeof draft.periodNm === "number" && draft.periodNm > GRAPHENE_LATTICE_NM / 2 ? (
                  <span data-testid="scale-conversion">θ = 2 arcsin(a / 2l) = {num(twistFromPeriodDegrees(draft.periodNm), 4)}°</span>
                ) : undefined
              }
            >
              <NumberInput id="periodNm" value={draft.periodNm} onChange={(v) => set("periodNm", v)} error={err("periodNm")} />
            </Field>
          )}
          <div className="grid grid-cols-2 gap-3">
            <Field id="modeVelocityMps" label="Mode velocity v" unit="m/s" error={err("modeVelocityMps")} hint="fitted, not a material constant">
              <NumberInput id="modeVelocityMps" value={draft.modeVelocityMps} onChange={(v) => set("modeVelocityMps", v)} error={err("modeVelocityMps")} />
            </Field>
            {triangular ? (
              <Field id="channelsPerLink" label="Channels per link" error={err("channelsPerLink")}>
                <Select id="channelsPerLink" value={draft.channelsPerLink ?? 1} options={ONE_OR_TWO} onChange={(v) => set("channelsPerLink", v)} />
              </Field>
            ) : null}
            <Field id="degeneracy.spin" label="Spin degeneracy" error={err("degeneracy.spin")}>
              <Select
                id="degeneracy.spin"
                value={draft.degeneracy?.spin ?? (triangular ? 2 : 1)}
                options={ONE_OR_TWO}
                onChange={(v) => set("degeneracy.spin", v)}
              />
            </Field>
            {triangular ? (
              <Field id="degeneracy.valley" label="Valley degeneracy" error={err("degeneracy.valley")}>
                <Select id="degeneracy.valley" value={draft.degeneracy?.valley ?? 2} options={ONE_OR_TWO} onChange={(v) => set("degeneracy.valley", v)} />
              </Field>
            ) : null}
          </div>
        </fieldset>

        <fieldset className="tk-card space-y-3" disabled={!canEdit}>
          <legend className="px-1 text-caption font-semibold uppercase tracking-[0.14em] text-fg-faint">Node</legend>
          {triangular ? (
            usesProbabilities ? (
              <div className="grid gap-4 sm:grid-cols-[1fr_auto] xl:grid-cols-1 2xl:grid-cols-[1fr_auto]">
                <div className="space-y-3">
                  <div className="grid grid-cols-3 gap-2">
                    {(["forward", "left", "right"] as const).map((k) => (
                      <Field key={k} id={`node.${k}`} label={k === "forward" ? "Forward" : k === "left" ? "Left turn" : "Right turn"}>
                        <NumberInput id={`node.${k}`} value={node[k]} onChange={(v) => set(`node.${k}`, v)} error={nodeMessage} />
                      </Field>
                    ))}
                  </div>
                  {nodeMessage ? (
                    <div
                      id="node-error"
                      role="alert"
                      className="rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger"
                      data-testid="node-refusal"
                    >
                      <p>{nodeMessage}</p>
                      {!tripleVerdict.ok && tripleVerdict.suggestion ? (
                        <button
                          type="button"
                          className="mt-2 rounded-full border border-danger/50 px-2.5 py-0.5 font-medium hover:bg-surface"
                          onClick={() => {
                            const s = tripleVerdict.suggestion!;
                            const r3 = (x: number) => Math.round(x * 1e6) / 1e6;
                            setDraft((d) => ({
                              ...d,
                              node: { ...d.node, forward: r3(s.forward), left: r3(s.left), right: r3(1 - r3(s.forward) - r3(s.left)) },
                            }));
                          }}
                        >
                          Use forward = {num(tripleVerdict.suggestion.forward, 3)}, left = {num(tripleVerdict.suggestion.left, 3)}, right ={" "}
                          {num(tripleVerdict.suggestion.right, 3)}
                        </button>
                      ) : null}
                    </div>
                  ) : (
                    <p className="text-caption text-fg-faint">
                      Probabilities of going straight on or turning by ±120° at a node; they add up to 1. Fitted model parameters, not material constants.
                    </p>
                  )}
                  <div className="grid grid-cols-2 gap-2">
                    <Field id="node.branch" label="Branch" error={err("node.branch")} hint="which of the two mirror solutions">
                      <Select
                        id="node.branch"
                        value={node.branch ?? 1}
                        options={[
                          { value: 1, label: "+1" },
                          { value: -1, label: "−1" },
                        ]}
                        onChange={(v) => set("node.branch", v)}
                      />
                    </Field>
                    <Field id="node.phaseRad" label="Node phase χ" unit="rad" error={err("node.phaseRad")}>
                      <NumberInput id="node.phaseRad" value={node.phaseRad} onChange={(v) => set("node.phaseRad", v)} error={err("node.phaseRad")} />
                    </Field>
                  </div>
                </div>
                <div>
                  <TernaryDiagram value={triple} onPick={canEdit ? (t) => setDraft((d) => ({ ...d, node: { ...d.node, ...t } })) : undefined} />
                  <p className="max-w-[16rem] text-micro text-fg-faint">Shaded: triples a unitary node can have. Click to choose a point.</p>
                </div>
              </div>
            ) : (
              <p className="text-caption text-fg-soft">
                This node is given as an explicit unitary matrix; edit it in the JSON view below. {err("node.matrix") ?? err("node")}
              </p>
            )
          ) : (
            <Field id="node.turning" label="Turning probability p" error={err("node.turning")} hint="1 − p on the other sublattice; critical at p = 0.5">
              <NumberInput id="node.turning" value={node.turning} onChange={(v) => set("node.turning", v)} error={err("node.turning")} />
            </Field>
          )}
        </fieldset>

        <fieldset className="tk-card space-y-3" disabled={!canEdit}>
          <legend className="px-1 text-caption font-semibold uppercase tracking-[0.14em] text-fg-faint">Disorder</legend>
          <label className="flex items-center gap-2 text-body">
            <input
              type="checkbox"
              checked={draft.disorder !== undefined}
              onChange={(e) => set("disorder", e.target.checked ? { linkPhaseWidthRad: 6.283185307179586, forwardSpread: 0, seed: 1 } : undefined)}
            />
            Disordered sample
          </label>
          {draft.disorder !== undefined ? (
            <div className="grid grid-cols-3 gap-2">
              <Field id="disorder.linkPhaseWidthRad" label="Phase width w" unit="rad" error={err("disorder.linkPhaseWidthRad")} hint="2π = full">
                <NumberInput
                  id="disorder.linkPhaseWidthRad"
                  value={draft.disorder.linkPhaseWidthRad}
                  onChange={(v) => set("disorder.linkPhaseWidthRad", v)}
                  error={err("disorder.linkPhaseWidthRad")}
                />
              </Field>
              <Field id="disorder.forwardSpread" label={triangular ? "Forward spread" : "Turning spread"} error={err("disorder.forwardSpread")}>
                <NumberInput
                  id="disorder.forwardSpread"
                  value={draft.disorder.forwardSpread}
                  onChange={(v) => set("disorder.forwardSpread", v)}
                  error={err("disorder.forwardSpread")}
                />
              </Field>
              <Field id="disorder.seed" label="Seed" error={err("disorder.seed")} hint="same seed, same sample">
                <NumberInput id="disorder.seed" integer value={draft.disorder.seed} onChange={(v) => set("disorder.seed", v)} error={err("disorder.seed")} />
              </Field>
            </div>
          ) : null}
        </fieldset>

        {Object.entries(issues).filter(([k]) => !KNOWN_FIELDS.has(k)).length > 0 ? (
          <div role="alert" className="rounded-field border border-danger/40 bg-danger-soft p-3 text-caption text-danger">
            {Object.entries(issues)
              .filter(([k]) => !KNOWN_FIELDS.has(k))
              .map(([k, m]) => (
                <p key={k}>
                  <span className="font-mono">{k}</span>: {m}
                </p>
              ))}
          </div>
        ) : null}
        {serverError ? (
          <p role="alert" className="text-caption text-danger">
            {serverError}
          </p>
        ) : null}
        {canEdit && sizeOverPlan ? (
          <p
            id="plan-limit"
            role="alert"
            className="rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger"
            data-testid="plan-limit"
          >
            Saving is refused: {draft.size?.columns} × {draft.size?.rows} cells is over the {plan.label} plan&apos;s {plan.maxCellsPerSide} ×{" "}
            {plan.maxCellsPerSide}. Make it smaller, or <UpgradeHint plan={plan.id} />.
          </p>
        ) : null}
        {canEdit ? (
          <div className="flex flex-wrap items-center gap-3">
            <button type="submit" className="tk-btn" disabled={!canSave} aria-describedby={sizeOverPlan ? "plan-limit" : undefined}>
              {save.isPending ? "Saving…" : initial?.id ? "Save as new version" : "Create network"}
            </button>
            {save.isSuccess && initial?.id ? <span className="text-caption text-accent">Saved as version {save.data.version ?? ""}</span> : null}
            <button type="button" className="tk-btn-quiet" onClick={() => setShowJson((s) => !s)} aria-expanded={showJson}>
              {showJson ? "Hide JSON" : "Show JSON"}
            </button>
          </div>
        ) : (
          <div className="space-y-2">
            <RefusalNote id="network-refusal" reason={permission.reason ?? "Your role can read this network but not change it."} />
            <button type="button" className="tk-btn" disabled aria-describedby="network-refusal">
              {initial?.id ? "Save as new version" : "Create network"}
            </button>
          </div>
        )}
        {showJson ? <JsonEditor draft={draft} onChange={setDraft} /> : null}
      </form>

      <section aria-label="Drawing" className="min-w-0 space-y-2 xl:sticky xl:top-6 xl:self-start">
        <div className="flex items-center justify-between">
          <h2 className="text-lead font-semibold">Drawing</h2>
          {triangular ? (
            <div role="radiogroup" aria-label="Valley drawn" className="flex gap-1 rounded-full border border-line p-0.5 text-caption">
              {(["K", "K'"] as const).map((v) => (
                <button
                  key={v}
                  type="button"
                  role="radio"
                  aria-checked={valley === v}
                  onClick={() => setValley(v)}
                  className={`rounded-full px-2.5 py-0.5 ${valley === v ? "bg-accent text-accent-fg" : "text-fg-soft"}`}
                >
                  valley {v}
                </button>
              ))}
            </div>
          ) : null}
        </div>
        <NetworkDrawing shape={shape} linkNm={l} height={460} />
        <p className="text-caption text-fg-faint">
          {triangular
            ? `Arrows show the direction of motion in valley ${valley}; the other valley runs every link the opposite way`
            : "Arrows show the direction of motion"}
          . Leads (amber) sit on the left and right faces; the{" "}
          {draft.transverse === "open" ? "solid lines are the open edges" : "dashed lines are the periodic boundary, identified with each other"}.
        </p>
      </section>
    </div>
  );
}

const LATTICE_OPTIONS = [
  { value: "triangular", label: "Triangular" },
  { value: "square", label: "Square" },
];
const TRANSVERSE_OPTIONS = [
  { value: "periodic", label: "Periodic" },
  { value: "open", label: "Open" },
];
/** Channels per link, spin and valley degeneracy. */
const ONE_OR_TWO = [
  { value: 1, label: "1" },
  { value: 2, label: "2" },
];

const KNOWN_FIELDS = new Set([
  "lattice",
  "transverse",
  "size.columns",
  "size.rows",
  "size",
  "twistDegrees",
  "periodNm",
  "modeVelocityMps",
  "channelsPerLink",
  "degeneracy.spin",
  "degeneracy.valley",
  "node",
  "node.forward",
  "node.left",
  "node.right",
  "node.branch",
  "node.phaseRad",
  "node.turning",
  "node.matrix",
  "disorder.linkPhaseWidthRad",
  "disorder.forwardSpread",
  "disorder.seed",
]);

function JsonEditor({ draft, onChange }: { draft: NetworkDraft; onChange: (d: NetworkDraft) => void }) {
  const [text, setText] = useState(() => JSON.stringify(draft, null, 2));
  const [error, setError] = useState<string | null>(null);
  return (
    <div className="space-y-1">
      <label htmlFor="network-json" className="tk-label">
        Network description (JSON, engine schema v1)
      </label>
      <textarea
        id="network-json"
        className="tk-field h-72 font-mono text-caption"
        value={text}
        onChange={(e) => {
          setText(e.target.value);
          try {
            onChange(JSON.parse(e.target.value));
            setError(null);
          } catch (x) {
            setError(`Not valid JSON: ${(x as Error).message}`);
          }
        }}
      />
      {error ? <p className="text-caption text-danger">{error}</p> : null}
    </div>
  );
}
