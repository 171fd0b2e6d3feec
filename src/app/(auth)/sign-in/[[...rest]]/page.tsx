import type { Metadata } from "next";
import { Show } from "@clerk/nextjs";
import { Suspense } from "react";
import { AlreadySignedIn } from "@/components/auth/AlreadySignedIn";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { SignInForm } from "@/components/auth/SignInForm";

export const metadata: Metadata = { title: "Sign in" };

export default function SignInPage() {
  return (
    <AuthFrame title="Sign in" lead="Welcome back. You start in the group you last worked in.">
      <Show when="signed-in">
        <AlreadySignedIn />
      </Show>
      <Show when="signed-out">
        <Suspense>
          <SignInForm />
        </Suspense>
      </Show>
    </AuthFrame>
  );
}
