"use client";

import { useClerk } from "@clerk/nextjs";
import { useSignIn } from "@clerk/nextjs/legacy";
import Link from "next/link";
import { useSearchParams } from "next/navigation";
import { useState, type FormEvent } from "react";
import { groupToStartIn, rememberedGroup } from "@/components/shell/groupChoice";
import { AuthButton, AuthInput, FormMessage, attemptSession, safeRedirect } from "./formParts";

/** E-mail + password sign-in on Clerk's SignIn resource (a custom flow; no prebuilt UI). */
export function SignInForm() {
  const { isLoaded, signIn, setActive } = useSignIn();
  const clerk = useClerk();
  const params = useSearchParams();
  const redirect = safeRedirect(params.get("redirect_url"));
  const [email, setEmail] = useState(params.get("email") ?? "");
  const [password, setPassword] = useState("");
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<{ email?: string; password?: string; form?: string }>({});

  async function submit(e: FormEvent) {
    e.preventDefault();
    const next: typeof errors = {};
    if (!/^[^@\s]+@[^@\s]+$/.test(email.trim())) next.email = "Enter the e-mail address you signed up with.";
    if (!password) next.password = "Enter your password.";
    setErrors(next);
    if (Object.keys(next).length || !isLoaded) return;
    await attemptSession(() => signIn.create({ identifier: email.trim(), password }), {
      setActive,
      redirect,
      incomplete: "This account needs a sign-in step Triskel does not offer yet; contact support.",
      setErrors,
      setBusy,
      // Start in the last-used group (or a lab member's lab), not always in the personal group.
      afterSession: async (session) => {
        const orgIds = (clerk.user?.organizationMemberships ?? []).map((m) => m.organization.id);
        const organization = groupToStartIn(rememberedGroup(), orgIds);
        if (organization) await clerk.setActive({ session, organization });
      },
    });
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-5" data-testid="sign-in-form" data-ready={isLoaded ? "yes" : "no"}>
      {errors.form ? <FormMessage>{errors.form}</FormMessage> : null}
      <AuthInput id="email" label="E-mail" type="email" autoComplete="email" value={email} onChange={(e) => setEmail(e.target.value)} error={errors.email} />
      <AuthInput
        id="password"
        label="Password"
        type="password"
        autoComplete="current-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={errors.password}
      />
      <AuthButton busy={busy || !isLoaded}>Sign in</AuthButton>
      <p className="text-caption text-ink-faint">
        New to Triskel?{" "}
        <Link className="font-semibold text-wall-700 underline-offset-2 hover:underline" href={`/sign-up${params.toString() ? `?${params}` : ""}`}>
          Create an account
        </Link>{" "}
        — it comes with a personal group on the Free plan.
      </p>
    </form>
  );
}
