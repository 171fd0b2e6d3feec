import { ClerkProvider } from "@clerk/nextjs";
import type { ReactNode } from "react";

/**
 * Clerk for the whole app. Keys, the Frontend API proxy (the local stand-in in development and
 * tests) and the self-served clerk-js come from NEXT_PUBLIC_CLERK_* variables (scripts/env.d/clerk.sh).
 * Sign-in and sign-up are our own pages (src/app/(auth)), built on Clerk's hooks.
 */
export function TriskelAuthProvider({ children }: { children: ReactNode }) {
  return (
    <ClerkProvider
      signInUrl="/sign-in"
      signUpUrl="/sign-up"
      signInFallbackRedirectUrl="/networks"
      signUpFallbackRedirectUrl="/networks"
      afterSignOutUrl="/sign-in"
    >
      {children}
    </ClerkProvider>
  );
}
