/** Networks (`/api/v1/networks`): saved, versioned network definitions. */
import type { Network } from "@/engine/browser";

export interface NetworkView {
  id: string;
  name: string;
  /** The version shown (the current one unless ?version= asked for another). */
  version: number;
  currentVersion: number;
  versionId: string;
  network: Network;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
  versionCreatedAt: string;
  /** How many calculations and scans use this network (GET of one network). */
  usedBy?: { runs: number; sweeps: number };
}

export interface NetworkVersionView {
  version: number;
  versionId: string;
  createdAt: string;
  createdBy: string | null;
}

/** GET /api/v1/networks/{id}: the network and its version history. */
export interface NetworkDetail extends NetworkView {
  versions: NetworkVersionView[];
}

export interface NetworkList {
  networks: NetworkView[];
  nextCursor: string | null;
}
