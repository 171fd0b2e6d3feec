"use client";

import { useSignUp } from "@clerk/nextjs/legacy";
import Link from "next/link";
import { useSearchParams } from "next/navigation";
import { useState, type FormEvent } from "react";
import { AuthButton, AuthInput, FormMessage, attemptSession, safeRedirect } from "./formParts";

/** Account creation on Clerk's SignUp resource (custom flow): name, e-mail, password. */
export function SignUpForm() {
  const { isLoaded, signUp, setActive } = useSignUp();
  const params = useSearchParams();
  const redirect = safeRedirect(params.get("redirect_url"));
  const [name, setName] = useState("");
  const [email, setEmail] = useState(params.get("email") ?? "");
  const [password, setPassword] = useState("");
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<{ name?: string; email?: string; password?: string; form?: string }>({});

  async function submit(e: FormEvent) {
    e.preventDefault();
    const next: typeof errors = {};
    if (!name.trim()) next.name = "Enter your name as colleagues should see it.";
    if (!/^[^@\s]+@[^@\s]+\.[^@\s]+$/.test(email.trim())) next.email = "Enter a valid e-mail address.";
    if (password.length < 8) next.password = "Use at least 8 characters.";
    setErrors(next);
    if (Object.keys(next).length || !isLoaded) return;
    await attemptSession(
      () => {
        const [firstName, ...rest] = name.trim().split(/\s+/);
        return signUp.create({ emailAddress: email.trim(), password, firstName, lastName: rest.join(" ") });
      },
      { setActive, redirect, incomplete: "Your account needs a verification step Triskel does not offer yet; contact support.", setErrors, setBusy },
    );
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-5" data-testid="sign-up-form" data-ready={isLoaded ? "yes" : "no"}>
      {errors.form ? <FormMessage>{errors.form}</FormMessage> : null}
      <AuthInput id="name" label="Name" autoComplete="name" value={name} onChange={(e) => setName(e.target.value)} error={errors.name} />
      <AuthInput id="email" label="E-mail" type="email" autoComplete="email" value={email} onChange={(e) => setEmail(e.target.value)} error={errors.email} />
      <AuthInput
        id="password"
        label="Password"
        type="password"
        autoComplete="new-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={errors.password}
      />
      <AuthButton busy={busy || !isLoaded}>Create account</AuthButton>
      <p className="text-caption text-ink-faint">
        Already have an account?{" "}
        <Link className="font-semibold text-wall-700 underline-offset-2 hover:underline" href={`/sign-in${params.toString() ? `?${params}` : ""}`}>
          Sign in
        </Link>
      </p>
    </form>
  );
}
