import Link from "next/link";
import { Mark } from "./Mark";

/**
 * Triskel's one logo: the mark and the name, linked. Every page that shows the logo (landing,
 * pricing, manual, status, sign-in and sign-up, the signed-in shell) uses this component.
 */
export function Logo({ href = "/", size = 28, className = "" }: { href?: string; size?: number; className?: string }) {
  return (
    <Link href={href} className={`inline-flex items-center gap-2 font-semibold tracking-tight ${className}`} data-testid="logo">
      <Mark size={size} />
      <span>Triskel</span>
    </Link>
  );
}
