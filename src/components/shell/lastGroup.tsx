"use client";

import { useAuth } from "@clerk/nextjs";
import { useEffect } from "react";
import { rememberGroup } from "./groupChoice";

/** Keeps the cookie on the group this signed-in page works in (rendered once by the shell). */
export function RememberGroup() {
  const { isLoaded, isSignedIn, orgId } = useAuth();
  useEffect(() => {
    if (isLoaded && isSignedIn) rememberGroup(orgId ?? null);
  }, [isLoaded, isSignedIn, orgId]);
  return null;
}
