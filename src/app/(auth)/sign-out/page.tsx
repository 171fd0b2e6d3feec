import type { Metadata } from "next";
import { AuthFrame } from "@/components/auth/AuthFrame";
import { SignOutNow } from "@/components/auth/SignOut";

export const metadata: Metadata = { title: "Sign out" };

/** GET /sign-out: ends the session and returns to the sign-in page (a plain link works). */
export default function SignOutPage() {
  return (
    <AuthFrame title="Signing out">
      <SignOutNow />
    </AuthFrame>
  );
}
