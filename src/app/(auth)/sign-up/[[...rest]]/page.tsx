import type { Metadata } from "next";
import { Suspense } from "react";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { SignUpForm } from "@/components/auth/SignUpForm";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <AuthFrame title="Create your account" lead="You get a personal workspace on the Free plan; a lab can invite you to theirs.">
      <Suspense>
        <SignUpForm />
      </Suspense>
    </AuthFrame>
  );
}
