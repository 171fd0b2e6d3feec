"use client";

import type { InputHTMLAttributes, ReactNode } from "react";

/** Labelled input of the auth pages, with its error linked for screen readers. */
export function AuthInput({ id, label, error, ...rest }: { id: string; label: string; error?: string } & InputHTMLAttributes<HTMLInputElement>) {
  return (
    <div>
      <label htmlFor={id} className="block text-caption font-semibold uppercase tracking-wider text-ink-soft">
        {label}
      </label>
      <input
        id={id}
        name={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className={
          "mt-1 block w-full rounded-lg border border-ink/20 bg-paper-raised px-3 py-2 " +
          "text-body text-ink outline-none focus:border-wall-500 focus:ring-2 focus:ring-wall-300 aria-[invalid=true]:border-alarm-500"
        }
        {...rest}
      />
      {error ? (
        <p id={`${id}-error`} role="alert" className="mt-1 text-caption text-alarm-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function AuthButton({ children, busy, ...rest }: { children: ReactNode; busy?: boolean } & React.ButtonHTMLAttributes<HTMLButtonElement>) {
  return (
    <button
      type="submit"
      disabled={busy || rest.disabled}
      className={
        "inline-flex w-full items-center justify-center rounded-full bg-wall-700 px-5 py-2.5 " +
        "text-body font-semibold text-paper transition hover:bg-wall-900 disabled:cursor-wait disabled:opacity-60"
      }
      {...rest}
    >
      {busy ? "Working…" : children}
    </button>
  );
}

export function FormMessage({ children }: { children: ReactNode }) {
  return (
    <p role="alert" className="rounded-lg border border-alarm-500/40 bg-alarm-100 px-3 py-2 text-caption text-alarm-700">
      {children}
    </p>
  );
}

/** Clerk errors carry `errors[{code, longMessage, meta.paramName}]`; map them to our fields. */
export function clerkErrorFields(err: unknown): { field?: string; message: string } {
  const e = err as { errors?: { code?: string; longMessage?: string; message?: string; meta?: { paramName?: string } }[] };
  const first = e?.errors?.[0];
  if (!first) return { message: err instanceof Error ? err.message : "Something went wrong; try again." };
  const param = first.meta?.paramName;
  const field = param === "identifier" || param === "email_address" ? "email" : param === "password" ? "password" : undefined;
  return { field, message: first.longMessage || first.message || "Something went wrong; try again." };
}

/** What a Clerk sign-in or sign-up attempt reports back. */
interface Attempt {
  status: string | null;
  createdSessionId: string | null;
}

/**
 * Runs a sign-in or sign-up attempt once the form's own checks passed: a complete attempt becomes
 * the active session and the browser goes on to `redirect`; an attempt that wants a further step
 * shows `incomplete`; a refusal shows Clerk's message on its field, or on the whole form.
 */
export async function attemptSession(
  start: () => Promise<Attempt>,
  {
    setActive,
    redirect,
    incomplete,
    setErrors,
    setBusy,
    afterSession,
  }: {
    setActive: (params: { session: string }) => Promise<unknown>;
    /** Runs once the session is active, before the redirect (the sign-in form picks the group to start in). */
    afterSession?: (sessionId: string) => Promise<void>;
    redirect: string;
    incomplete: string;
    setErrors: (errors: Record<string, string>) => void;
    setBusy: (busy: boolean) => void;
  },
): Promise<void> {
  setBusy(true);
  try {
    const attempt = await start();
    if (attempt.status !== "complete" || !attempt.createdSessionId) {
      setErrors({ form: incomplete });
      return;
    }
    await setActive({ session: attempt.createdSessionId });
    if (afterSession) await afterSession(attempt.createdSessionId);
    window.location.assign(redirect);
  } catch (err) {
    const { field, message } = clerkErrorFields(err);
    setErrors(field ? { [field]: message } : { form: message });
  } finally {
    setBusy(false);
  }
}

/** Only same-site paths are followed after sign-in (no open redirects). */
export function safeRedirect(target: string | null | undefined, fallback = "/networks"): string {
  if (!target || !target.startsWith("/") || target.startsWith("//")) return fallback;
  return target;
}
