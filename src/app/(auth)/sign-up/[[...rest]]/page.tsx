import type { Metadata } from "next";
import { Show } from "@clerk/nextjs";
import { Suspense } from "react";
import { AlreadySignedIn } from "@/components/auth/AlreadySignedIn";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { SignUpForm } from "@/components/auth/SignUpForm";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <AuthFrame title="Create your account" lead="You get a personal group on the Free plan; a lab can invite you to theirs.">
      <Show when="signed-in">
        <AlreadySignedIn />
      </Show>
      <Show when="signed-out">
        <Suspense>
          <SignUpForm />
        </Suspense>
      </Show>
    </AuthFrame>
  );
}
