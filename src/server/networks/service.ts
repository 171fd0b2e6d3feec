/**
 * Saved, versioned networks. Editing a network makes a new version; runs and sweeps point at the
 * version they used, so a result can always be traced to the exact description it came from.
 * Every query is scoped to the caller's workspace.
 */
import "@/server/server-only";
import { and, desc, eq, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import type { Caller } from "@/server/auth";
import { requirePermission } from "@/server/auth";
import { assertNetworkWithinPlan } from "@/server/billing/limits";
import { getDb } from "@/server/db";
import { networks, networkVersions, runs, sweeps } from "@/server/db/schema";
import { networkSize, parseNetworkDefinition } from "@/server/engine";
import { beforeCursor, createdAtText, decodeCursor, encodeCursor, pageLimit } from "@/server/http/cursor";
import { ApiError, PROTOTYPE_KEYS, zodToApiError } from "@/server/http/errors";
import type { Network } from "@/engine/browser";
import type { NetworkView } from "@/shared/api";

const nameSchema = z.string().trim().min(1, "must not be empty").max(200, "at most 200 characters");
const uuidLike = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const createNetworkBody = z.object({ name: nameSchema, network: z.unknown() }).strict();
export const replaceNetworkBody = z.object({ name: nameSchema.optional(), network: z.unknown() }).strict();
export const patchNetworkBody = z.object({ name: nameSchema.optional(), network: z.record(z.string(), z.unknown()).optional() }).strict();

/** Validates a network description with the engine's schema; errors name the field under `network`. */
export function parseNetwork(value: unknown, caller: Caller): Network {
  if (value === undefined) throw new ApiError("invalid_input", "network: required; send the network description (engine schema).", { field: "network" });
  const network = parseNetworkDefinition(value);
  assertNetworkWithinPlan(caller.plan, networkSize(network));
  return network;
}

type NetworkRow = typeof networks.$inferSelect;
type VersionRow = typeof networkVersions.$inferSelect;

export function networkView(n: NetworkRow, v: VersionRow, inUse?: { runs: number; sweeps: number }): NetworkView {
  return {
    id: n.id,
    name: n.name,
    version: v.version,
    currentVersion: n.currentVersion,
    versionId: v.id,
    network: v.definition,
    createdBy: n.createdBy,
    createdAt: n.createdAt.toISOString(),
    updatedAt: n.updatedAt.toISOString(),
    versionCreatedAt: v.createdAt.toISOString(),
    ...(inUse ? { usedBy: inUse } : {}),
  };
}

function notFound(id: string): never {
  throw new ApiError("not_found", `No network with id ${id} in this group.`, { networkId: id });
}

export async function createNetwork(caller: Caller, body: unknown) {
  requirePermission(caller, "work.create");
  const parsed = createNetworkBody.safeParse(body);
  if (!parsed.success) throw zodToApiError(parsed.error);
  const definition = parseNetwork(parsed.data.network, caller);
  const db = getDb();
  return db.transaction(async (tx) => {
    const [n] = await tx.insert(networks).values({ workspaceId: caller.workspaceId, name: parsed.data.name, createdBy: caller.userId }).returning();
    const [v] = await tx.insert(networkVersions).values({ networkId: n.id, version: 1, definition, createdBy: caller.userId }).returning();
    return networkView(n, v);
  });
}

async function loadNetwork(caller: Caller, id: string): Promise<NetworkRow> {
  if (!uuidLike.test(id)) notFound(id);
  const [n] = await getDb()
    .select()
    .from(networks)
    .where(and(eq(networks.id, id), eq(networks.workspaceId, caller.workspaceId)));
  if (!n) notFound(id);
  return n;
}

async function loadVersion(networkId: string, version: number): Promise<VersionRow> {
  const [v] = await getDb()
    .select()
    .from(networkVersions)
    .where(and(eq(networkVersions.networkId, networkId), eq(networkVersions.version, version)));
  if (!v) throw new ApiError("not_found", `Network ${networkId} has no version ${version}.`, { networkId, version });
  return v;
}

async function usage(networkId: string) {
  const db = getDb();
  const versionIds = db.select({ id: networkVersions.id }).from(networkVersions).where(eq(networkVersions.networkId, networkId));
  const [r] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(runs)
    .where(inArray(runs.networkVersionId, versionIds));
  const [s] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(sweeps)
    .where(inArray(sweeps.networkVersionId, versionIds));
  return { runs: r?.n ?? 0, sweeps: s?.n ?? 0 };
}

export async function getNetwork(caller: Caller, id: string, version?: number) {
  requirePermission(caller, "results.view");
  const n = await loadNetwork(caller, id);
  const v = await loadVersion(n.id, version ?? n.currentVersion);
  const versions = await getDb()
    .select({ version: networkVersions.version, versionId: networkVersions.id, createdAt: networkVersions.createdAt, createdBy: networkVersions.createdBy })
    .from(networkVersions)
    .where(eq(networkVersions.networkId, n.id))
    .orderBy(networkVersions.version);
  return { ...networkView(n, v, await usage(n.id)), versions: versions.map((x) => ({ ...x, createdAt: x.createdAt.toISOString() })) };
}

export async function listNetworks(caller: Caller, query: URLSearchParams) {
  requirePermission(caller, "results.view");
  const limit = pageLimit(query.get("limit"));
  const cursor = decodeCursor(query.get("cursor"));
  const db = getDb();
  const rows = await db
    .select({ n: networks, v: networkVersions, at: createdAtText(networks.createdAt) })
    .from(networks)
    .innerJoin(networkVersions, and(eq(networkVersions.networkId, networks.id), eq(networkVersions.version, networks.currentVersion)))
    .where(and(eq(networks.workspaceId, caller.workspaceId), beforeCursor(networks.createdAt, networks.id, cursor)))
    .orderBy(desc(networks.createdAt), desc(networks.id))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page[page.length - 1];
  return {
    networks: page.map((r) => networkView(r.n, r.v)),
    nextCursor: rows.length > limit && last ? encodeCursor(last.at, last.n.id) : null,
  };
}

/** The dotted path of the first `__proto__`, `constructor` or `prototype` key in a body, or undefined. */
function prototypeKeyPath(value: unknown, path: string[] = [], depth = 0): string | undefined {
  if (value === null || typeof value !== "object" || depth > 100) return undefined;
  for (const key of Object.keys(value)) {
    if (PROTOTYPE_KEYS.has(key)) return [...path, key].join(".");
    const found = prototypeKeyPath((value as Record<string, unknown>)[key], [...path, key], depth + 1);
    if (found) return found;
  }
  return undefined;
}

/**
 * The description with the patch merged in (null removes a field). Only own keys of plain data
 * are read and written, into fresh objects: a key such as `__proto__` (refused before, see
 * updateNetwork) could not reach a prototype here either.
 */
function deepMerge(base: Record<string, unknown>, patch: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(base)) if (!PROTOTYPE_KEYS.has(k)) define(out, k, base[k]);
  for (const k of Object.keys(patch)) {
    if (PROTOTYPE_KEYS.has(k)) continue;
    const v = patch[k];
    const b = Object.hasOwn(out, k) ? out[k] : undefined;
    if (v === null) delete out[k];
    else if (v && typeof v === "object" && !Array.isArray(v) && b && typeof b === "object" && !Array.isArray(b))
      define(out, k, deepMerge(b as Record<string, unknown>, v as Record<string, unknown>));
    else define(out, k, v);
  }
  return out;
}
const define = (o: Record<string, unknown>, k: string, v: unknown) =>
  Object.defineProperty(o, k, { value: v, enumerable: true, writable: true, configurable: true });

/** PUT (replace the description) or PATCH (merge fields into it; null removes a field): a new version. */
export async function updateNetwork(caller: Caller, id: string, body: unknown, mode: "replace" | "merge") {
  requirePermission(caller, "work.create");
  const n = await loadNetwork(caller, id);
  // JSON.parse keeps "__proto__" as an own key, zod's record copy drops it silently: refuse it
  // (and constructor/prototype) by name instead of accepting a body that did not say what it meant.
  const protoKey = prototypeKeyPath(body);
  if (protoKey) throw new ApiError("invalid_input", `${protoKey}: this key is not allowed (it names an object's prototype).`, { field: protoKey });
  let name: string | undefined;
  let next: Network | undefined;
  if (mode === "replace") {
    const parsed = replaceNetworkBody.safeParse(body);
    if (!parsed.success) throw zodToApiError(parsed.error);
    name = parsed.data.name;
    next = parseNetwork(parsed.data.network, caller);
  } else {
    const parsed = patchNetworkBody.safeParse(body);
    if (!parsed.success) throw zodToApiError(parsed.error);
    name = parsed.data.name;
    if (parsed.data.network) {
      const current = await loadVersion(n.id, n.currentVersion);
      next = parseNetwork(deepMerge(current.definition as unknown as Record<string, unknown>, parsed.data.network), caller);
    }
  }
  const db = getDb();
  return db.transaction(async (tx) => {
    // Lock the network row so two edits at once make versions n+1 and n+2, never two n+1.
    const [locked] = await tx.select().from(networks).where(eq(networks.id, n.id)).for("update");
    let version = locked.currentVersion;
    let v: VersionRow;
    if (next) {
      version += 1;
      [v] = await tx.insert(networkVersions).values({ networkId: n.id, version, definition: next, createdBy: caller.userId }).returning();
    } else {
      [v] = await tx
        .select()
        .from(networkVersions)
        .where(and(eq(networkVersions.networkId, n.id), eq(networkVersions.version, version)));
    }
    const [updated] = await tx
      .update(networks)
      .set({ currentVersion: version, updatedAt: new Date(), ...(name ? { name } : {}) })
      .where(eq(networks.id, n.id))
      .returning();
    return networkView(updated, v);
  });
}

export async function deleteNetwork(caller: Caller, id: string): Promise<void> {
  requirePermission(caller, "work.create");
  const n = await loadNetwork(caller, id);
  if (n.createdBy !== caller.userId) requirePermission(caller, "work.manageOthers");
  const used = await usage(n.id);
  if (used.runs > 0 || used.sweeps > 0) {
    throw new ApiError(
      "conflict",
      `Network "${n.name}" is used by ${used.runs} run(s) and ${used.sweeps} sweep(s); it cannot be deleted while results point at it.`,
      { networkId: n.id, usedBy: used },
    );
  }
  try {
    await getDb()
      .delete(networks)
      .where(and(eq(networks.id, n.id), eq(networks.workspaceId, caller.workspaceId)));
  } catch (err) {
    // A run submitted between the check and the delete: the foreign key (restrict) refuses it.
    if ((err as { code?: string }).code === "23503")
      throw new ApiError("conflict", `Network "${n.name}" is now used by a run; it cannot be deleted.`, { networkId: n.id });
    throw err;
  }
}

/** The network a run or sweep names by id: its current version, or `networkVersion` if given. */
export async function resolveNetwork(caller: Caller, networkId: string, version?: number) {
  const n = await loadNetwork(caller, networkId);
  const v = await loadVersion(n.id, version ?? n.currentVersion);
  return { networkVersionId: v.id, definition: v.definition, name: n.name, version: v.version };
}

export function isUuid(id: string): boolean {
  return uuidLike.test(id);
}
