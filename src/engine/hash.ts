import { createHash } from "node:crypto";
import type { ComputeInput } from "./schema";

/** JSON with object keys sorted recursively (arrays keep their order). */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map((v) => canonicalJson(v)).join(",")}]`;
  const keys = Object.keys(value as Record<string, unknown>)
    .filter((k) => (value as Record<string, unknown>)[k] !== undefined)
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`).join(",")}}`;
}

/** sha256 (hex) of the canonical JSON of a parsed input (defaults applied). */
export function inputHash(input: ComputeInput): string {
  return createHash("sha256").update(canonicalJson(input)).digest("hex");
}
