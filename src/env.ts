import "./server/server-only";
import { z } from "zod";

/**
 * Every environment variable Triskel reads, validated once at start-up. The scripts in
 * scripts/ export working local defaults, so nothing needs editing on a developer's machine.
 * A bad or missing value stops the process with one line naming it (see `loadEnvOrExit`).
 *
 * The only place that reads process.env (tests/unit/env-usage.test.ts keeps it so), apart from
 * the engine's own kernel variables (src/engine), Next's NEXT_RUNTIME (src/instrumentation.ts)
 * and the worker's thread counts for OpenBLAS (worker/main.ts). Every key is listed in
 * .env.example. Call env() inside functions, never at module level: `next build` imports server
 * modules and must work without the variables.
 */
const url = (what: string) => z.string().url({ message: `must be a URL (${what})` });

export const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: url("postgres://user@host:port/db").refine((v) => /^postgres(ql)?:\/\//.test(v), "must start with postgres://"),
  /** Connections in each process's PostgreSQL pool (web and worker each have one). */
  DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(200).default(10),
  REDIS_URL: url("redis://host:port").refine((v) => /^rediss?:\/\//.test(v), "must start with redis://"),
  /** Public base URL of the web app, used in e-mails and redirects. */
  APP_URL: url("http://127.0.0.1:3000").default("http://127.0.0.1:3000"),
  /** BullMQ key prefix, so several instances can share one Redis. */
  QUEUE_PREFIX: z
    .string()
    .regex(/^[a-z0-9:_-]+$/i, "letters, digits, ':', '_' and '-' only")
    .default("triskel"),
  /** Engine runs in parallel per worker process (threads in the pool). */
  WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(64).default(2),
  LOG_LEVEL: z.enum(["debug", "info", "warn", "error"]).default("info"),
  // --- request rate limits per API token and per signed-in member (src/server/http/rate-limit.ts) ---
  RATE_LIMIT_READS_PER_MINUTE: z.coerce.number().int().min(1).default(600),
  RATE_LIMIT_WRITES_PER_MINUTE: z.coerce.number().int().min(1).default(120),
  // --- accounts (docs/accounts.md): Clerk through @clerk/nextjs, which reads its own CLERK_* and
  // NEXT_PUBLIC_CLERK_* variables; scripts/env.d/clerk.sh points them at the local stand-in.
  CLERK_SECRET_KEY: z
    .string()
    .regex(/^sk_(test|live)_/, "must be a Clerk secret key (sk_test_... or sk_live_...)")
    .optional(),
  NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY: z
    .string()
    .regex(/^pk_(test|live)_/, "must be a Clerk publishable key (pk_test_... or pk_live_...)")
    .optional(),
  /** Signing secret of the Clerk webhook endpoint /api/webhooks/clerk (Standard Webhooks). */
  CLERK_WEBHOOK_SECRET: z
    .string()
    .regex(/^whsec_[A-Za-z0-9+/=_-]+$/, "must be a webhook signing secret (whsec_...)")
    .optional(),
  // --- mail (docs/accounts.md): nodemailer over SMTP; locally the maildev stand-in.
  SMTP_URL: z
    .string()
    .regex(/^smtps?:\/\//, "must start with smtp:// or smtps://")
    .default("smtp://127.0.0.1:1025"),
  MAIL_FROM: z.string().min(3, "must be a sender such as `Triskel <no-reply@example.org>`").default("Triskel <no-reply@triskel.local>"),
  /** Days an invitation link stays valid. */
  INVITATION_TTL_DAYS: z.coerce.number().int().min(1).max(90).default(7),
  // --- billing (docs/billing.md): Stripe through its SDK; the local stand-in sets all of these.
  STRIPE_SECRET_KEY: z
    .string()
    .regex(/^(sk|rk)_(test|live)_/, "must be a Stripe secret key (sk_test_... or sk_live_...)")
    .optional(),
  STRIPE_WEBHOOK_SECRET: z
    .string()
    .regex(/^whsec_/, "must be a webhook signing secret (whsec_...)")
    .optional(),
  /** Only for the local stand-in: where the SDK sends requests (default: api.stripe.com over https). */
  STRIPE_API_HOST: z.string().optional(),
  STRIPE_API_PORT: z.coerce.number().int().min(1).max(65535).optional(),
  STRIPE_API_PROTOCOL: z.enum(["http", "https"]).optional(),
  /** How often the meter sender (worker) looks for usage to send to Stripe. */
  METER_SENDER_INTERVAL_MS: z.coerce.number().int().min(50).max(3_600_000).default(2000),
  /** A row claimed by one sender is left alone by the others this long (a killed sender's rows come back). */
  METER_SENDER_LEASE_SECONDS: z.coerce.number().int().min(1).max(3600).default(30),
  /** Only for a standalone sender (`tsx worker/billing.ts`, tests): send this workspace's usage only. */
  METER_SENDER_WORKSPACE_ID: z.preprocess((v) => (v === "" ? undefined : v), z.uuid({ message: "must be a workspace id (a UUID)" }).optional()),
  // --- runs and sweeps worker (issue 4) ---
  /** Engine threads per worker process (piscina pool); default: WORKER_CONCURRENCY. */
  WORKER_POOL_SIZE: z.coerce.number().int().min(1).max(64).optional(),
  /** How long a job's lock lives without renewal; a dead worker's jobs are retried after it. */
  WORKER_LOCK_MS: z.coerce.number().int().min(2000).max(600_000).default(10_000),
  /** How often a worker looks for stalled jobs (whose worker died). */
  WORKER_STALLED_INTERVAL_MS: z.coerce.number().int().min(1000).max(600_000).default(5_000),
  /** How often a worker re-enqueues runs the database holds as queued but Redis has no job for. */
  WORKER_RECOVERY_INTERVAL_MS: z.coerce.number().int().min(1000).max(3_600_000).default(10_000),
  // --- end runs and sweeps worker ---
});

export type Env = z.infer<typeof envSchema>;

export class EnvError extends Error {}

/** Parses an environment; throws EnvError whose message is one line per bad variable. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => {
      const name = issue.path.join(".");
      const value = source[name];
      const problem =
        value === undefined || value === "" ? "is missing" : `is invalid (${JSON.stringify(value.length > 60 ? value.slice(0, 60) + "…" : value)})`;
      return `environment variable ${name} ${problem}: ${issue.message}`;
    });
    throw new EnvError(lines.join("\n"));
  }
  return parsed.data;
}

let cached: Env | undefined;

/** The validated environment of this process. In a CLI or worker, a bad value exits with status 78. */
export function env(): Env {
  if (!cached) cached = parseEnv(process.env);
  return cached;
}

/** For entry points: validate at start-up, print the one-line reason and exit instead of a stack trace. */
export function loadEnvOrExit(): Env {
  try {
    return env();
  } catch (err) {
    if (err instanceof EnvError) {
      console.error(`Triskel cannot start: ${err.message}`);
      process.exit(78);
    }
    throw err;
  }
}
