import "@/server/server-only";
import { Queue, type ConnectionOptions } from "bullmq";
import { Redis } from "ioredis";
import { env } from "@/env";

/** Queue names, defined once. Runs and sweep points share `runs`; fits have `fits`; `system` carries maintenance jobs. */
export const QUEUES = { runs: "runs", fits: "fits", system: "system" } as const;
export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

/** A new Redis connection as BullMQ wants it (no per-request retry limit). Callers quit it. */
export function newRedis(url = env().REDIS_URL, options: { lazy?: boolean } = {}): Redis {
  return new Redis(url, { maxRetriesPerRequest: null, enableOfflineQueue: true, lazyConnect: options.lazy ?? false });
}

type Shared = { redis: Redis; queues: Map<QueueName, Queue> };
const globalForQueue = globalThis as unknown as { __triskelQueue?: Shared };

function shared(): Shared {
  if (!globalForQueue.__triskelQueue) globalForQueue.__triskelQueue = { redis: newRedis(), queues: new Map() };
  return globalForQueue.__triskelQueue;
}

/** The process-wide producer for a queue. */
export function getQueue(name: QueueName): Queue {
  const s = shared();
  let q = s.queues.get(name);
  if (!q) {
    q = new Queue(name, { connection: s.redis as ConnectionOptions, prefix: env().QUEUE_PREFIX });
    s.queues.set(name, q);
  }
  return q;
}

/** Round trip to Redis for health checks; a fresh short-lived connection so a dead server fails fast. */
export async function pingRedis(timeoutMs = 2000): Promise<number> {
  const started = performance.now();
  const probe = new Redis(env().REDIS_URL, {
    maxRetriesPerRequest: 0,
    connectTimeout: timeoutMs,
    lazyConnect: true,
    enableOfflineQueue: false,
    retryStrategy: () => null,
  });
  probe.on("error", () => {});
  try {
    await Promise.race([
      probe.connect().then(() => probe.ping()),
      new Promise((_, reject) => setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs)),
    ]);
    return performance.now() - started;
  } finally {
    probe.disconnect();
  }
}

export async function closeQueues(): Promise<void> {
  const s = globalForQueue.__triskelQueue;
  globalForQueue.__triskelQueue = undefined;
  if (!s) return;
  await Promise.all([...s.queues.values()].map((q) => q.close()));
  await s.redis.quit().catch(() => s.redis.disconnect());
}
