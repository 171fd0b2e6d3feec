"use client";

import { useMutation } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState, type FormEvent } from "react";
import { ApiClientError } from "@/lib/api";
import type { NetworkView } from "@/shared/api";
import { estimateInput, validateComputationOn } from "@/lib/engineClient";
import { Field, NumberInput, Select } from "@/components/ui/Field";
import { buildComputation, defaultsFor, FIELDS, isShown, type ComputationKind, type FormValues } from "./computations";
import { defaultBar, HallBarContacts, type ContactDraft } from "./HallBarContacts";
import type { NetworkShape } from "@/lib/lattice";

/**
 * The computation part of the run form and of the sweep builder: its kind and field values, the
 * computation they build, the engine's check of it and the estimate on the network (compute-seconds
 * of one job; null until the computation is valid).
 */
export function useComputationDraft(network: NetworkView) {
  const [kind, setKind] = useState<ComputationKind>("conductance");
  const [values, setValues] = useState<FormValues>(() => defaultsFor("conductance"));
  // Hall bar: the side contacts (null: the engine's six-terminal bar)
  const [contacts, setContacts] = useState<ContactDraft[] | null>(null);
  const computation = useMemo(() => {
    const c = buildComputation(kind, values);
    return kind === "hallBar" && contacts !== null ? { ...c, contacts } : c;
  }, [kind, values, contacts]);
  const check = useMemo(() => validateComputationOn(network.network, computation), [network.network, computation]);
  const seconds = useMemo(() => (check.ok ? estimateInput({ network: network.network, computation }) : null), [check.ok, network.network, computation]);
  /** Another kind of computation, starting from its default values. */
  const chooseKind = (k: ComputationKind) => {
    setKind(k);
    setValues(defaultsFor(k));
    setContacts(null);
  };
  const net = network.network;
  const shape: NetworkShape = useMemo(
    () => ({ lattice: net.lattice, columns: net.size.columns, rows: net.size.rows, transverse: net.transverse, valley: "K" }),
    [net.lattice, net.size.columns, net.size.rows, net.transverse],
  );
  return { kind, values, setValues, chooseKind, computation, check, seconds, contacts, setContacts, shape };
}

export type ComputationDraft = ReturnType<typeof useComputationDraft>;

/** One input per field of the computation (those its other values call for), with unit and error. */
export function ComputationFields({
  draft,
  idPrefix,
  errorOf,
  hints = false,
}: {
  draft: ComputationDraft;
  idPrefix: string;
  errorOf: (path: string) => string | undefined;
  hints?: boolean;
}) {
  const { kind, values, setValues } = draft;
  return (
    <>
      {kind === "hallBar" ? (
        <HallBarContacts shape={draft.shape} contacts={draft.contacts ?? defaultBar(draft.shape.columns)} onChange={draft.setContacts} />
      ) : null}
      {FIELDS[kind]
        .filter((f) => isShown(f, values))
        .map((f) => {
          const id = `${idPrefix}${f.path}`;
          const error = errorOf(f.path);
          return (
            <Field key={f.path} id={id} label={f.label} unit={f.unit} hint={hints ? f.hint : undefined} error={error}>
              {f.options ? (
                <Select
                  id={id}
                  value={String(values[f.path] ?? f.default ?? "")}
                  options={f.options}
                  onChange={(v) => setValues((s) => ({ ...s, [f.path]: v }))}
                />
              ) : (
                <NumberInput id={id} integer={f.integer} value={values[f.path]} error={error} onChange={(v) => setValues((s) => ({ ...s, [f.path]: v }))} />
              )}
            </Field>
          );
        })}
    </>
  );
}

/**
 * Starting a run or a sweep: `start` posts it, and the browser goes on to `pageOf` the new job.
 * The server's refusal is kept in `serverError` until the next submit.
 */
export function useStartJob<T>(start: () => Promise<T>, pageOf: (job: T) => string) {
  const router = useRouter();
  const [serverError, setServerError] = useState<string | null>(null);
  const submit = useMutation({
    mutationFn: start,
    onSuccess: (job) => router.push(pageOf(job)),
    onError: (e) => setServerError(e instanceof ApiClientError ? e.message : String(e)),
  });
  /** The form's submit handler: posts only when `ready` (the form shows why it is not). */
  const onSubmit = (ready: boolean) => (e: FormEvent) => {
    e.preventDefault();
    setServerError(null);
    if (ready) submit.mutate();
  };
  return { submit, serverError, onSubmit };
}

export function ServerError({ message }: { message: string | null }) {
  return message ? (
    <p role="alert" className="rounded-field bg-danger-soft p-2 text-caption text-danger">
      {message}
    </p>
  ) : null;
}
