"use client";

import type { ReactNode } from "react";

/** A labelled form field with its unit and an inline error (linked with aria-describedby). */
export function Field({
  id,
  label,
  unit,
  hint,
  error,
  children,
}: {
  id: string;
  label: string;
  unit?: string;
  hint?: ReactNode;
  error?: string;
  children: ReactNode;
}) {
  return (
    <div className="min-w-0">
      <label htmlFor={id} className="tk-label">
        {label}
        {unit ? <span className="ml-1 font-mono text-micro text-fg-faint">[{unit}]</span> : null}
      </label>
      <div className="mt-1">{children}</div>
      {error ? (
        <p id={`${id}-error`} role="alert" className="mt-1 text-caption text-danger" data-field-error={id}>
          {error}
        </p>
      ) : hint ? (
        <p id={`${id}-hint`} className="mt-1 text-caption text-fg-faint">
          {hint}
        </p>
      ) : null}
    </div>
  );
}

/** Numeric input that keeps what the user typed (so "0." survives) and reports numbers up. */
export function NumberInput({
  id,
  value,
  onChange,
  step,
  min,
  max,
  error,
  integer,
}: {
  id: string;
  value: number | string | undefined;
  onChange: (v: number | string) => void;
  step?: number | string;
  min?: number;
  max?: number;
  error?: string;
  integer?: boolean;
}) {
  return (
    <input
      id={id}
      name={id}
      type="text"
      inputMode={integer ? "numeric" : "decimal"}
      className="tk-field font-mono tk-num"
      value={value ?? ""}
      aria-invalid={error ? true : undefined}
      aria-describedby={error ? `${id}-error` : undefined}
      data-step={step}
      data-min={min}
      data-max={max}
      onChange={(e) => {
        const raw = e.target.value;
        const n = Number(raw);
        onChange(raw.trim() !== "" && Number.isFinite(n) && !/[.eE+-]$/.test(raw.trim()) ? n : raw);
      }}
    />
  );
}

export function Select<T extends string | number>({
  id,
  value,
  options,
  onChange,
}: {
  id: string;
  value: T;
  options: { value: T; label: string }[];
  onChange: (v: T) => void;
}) {
  return (
    <select
      id={id}
      name={id}
      className="tk-field"
      value={String(value)}
      onChange={(e) => {
        const o = options.find((x) => String(x.value) === e.target.value);
        if (o) onChange(o.value);
      }}
    >
      {options.map((o) => (
        <option key={String(o.value)} value={String(o.value)}>
          {o.label}
        </option>
      ))}
    </select>
  );
}
