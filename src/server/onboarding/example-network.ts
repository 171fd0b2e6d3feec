import "@/server/server-only";
import { getDb } from "@/server/db";
import { networks, networkVersions } from "@/server/db/schema";
import { EXAMPLE_NETWORK } from "@/shared/networks";
import { parseNetworkDefinition } from "@/server/engine";

/**
 * Gives a group that was just created its example network (src/shared/networks.ts), so a newcomer
 * has something to open, draw and calculate at once. Called only right after the group's row was
 * inserted, so a group gets it once; deleting it later is the group's choice.
 */
export async function addExampleNetwork(workspaceId: string, createdBy: string | null): Promise<void> {
  const definition = parseNetworkDefinition(EXAMPLE_NETWORK.definition);
  await getDb().transaction(async (tx) => {
    const [n] = await tx.insert(networks).values({ workspaceId, name: EXAMPLE_NETWORK.name, createdBy }).returning();
    await tx.insert(networkVersions).values({ networkId: n.id, version: 1, definition, createdBy });
  });
}
