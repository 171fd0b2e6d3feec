import type { Metadata } from "next";
import { Suspense } from "react";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { SignInForm } from "@/components/auth/SignInForm";

export const metadata: Metadata = { title: "Sign in" };

export default function SignInPage() {
  return (
    <AuthFrame title="Sign in" lead="Welcome back. Your workspaces are where you left them.">
      <Suspense>
        <SignInForm />
      </Suspense>
    </AuthFrame>
  );
}
