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
  /**
   * 1: this production-mode process runs against the local stand-ins (fakes/) on purpose, as
   * `npm start` and `npm test` do; without it NODE_ENV=production refuses the stand-ins' keys.
   */
  TRISKEL_STAND_INS: z
    .enum(["0", "1"], { message: "must be 0 or 1" })
    .default("0")
    .transform((v) => v === "1"),
  // --- request rate limits per member (all their tokens and their session) and per client address
  // for requests that fail to authenticate (src/server/http/rate-limit.ts, docs/api.md "Rate limits") ---
  RATE_LIMIT_READS_PER_MINUTE: z.coerce.number().int().min(1).default(600),
  RATE_LIMIT_WRITES_PER_MINUTE: z.coerce.number().int().min(1).default(120),
  /** Requests a minute per client address that carry no credentials, an unknown, revoked or malformed token, or a bad webhook signature. */
  RATE_LIMIT_FAILED_PER_MINUTE: z.coerce.number().int().min(1).default(60),
  /**
   * Reverse proxies in front of the web app that append the client's address to X-Forwarded-For
   * (0: none, the app is reached directly). With 0 the header is the client's own word, so every
   * client without credentials shares one budget (key `direct`); with N the client address is the
   * N-th entry from the end (src/server/http/client-address.ts).
   */
  TRUSTED_PROXY_HOPS: z.coerce.number().int().min(0).max(10).default(0),
  /** Active (unrevoked) API tokens a member may hold in one workspace; one more answers 409. */
  API_TOKENS_PER_MEMBER: z.coerce.number().int().min(1).max(1000).default(20),
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
  /** The local sign-in stand-in (fakes/clerk): set, the app proxies its Frontend API at /__clerk (next.config.ts). */
  CLERK_FAKE_URL: url("http://127.0.0.1:3003").optional(),
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
  /** Engine threads per worker process (piscina pool); default: the larger of WORKER_CONCURRENCY and the number of cores. */
  WORKER_POOL_SIZE: z.coerce.number().int().min(1).max(64).optional(),
  /**
   * 1 (default): one run's valleys and ensemble samples also use the pool's free threads
   * (worker/helpers.ts); 0: each run computes in its own thread only. See docs/reliability.md
   * ("One run on several threads") for why it was off for a day.
   */
  WORKER_PARALLEL_RUNS: z.enum(["0", "1"]).default("1"),
  /** How long a job's lock lives without renewal; a dead worker's jobs are retried after it. */
  WORKER_LOCK_MS: z.coerce.number().int().min(2000).max(600_000).default(10_000),
  /** How often a worker looks for stalled jobs (whose worker died). */
  WORKER_STALLED_INTERVAL_MS: z.coerce.number().int().min(1000).max(600_000).default(5_000),
  /** How often a worker re-enqueues runs the database holds as queued but Redis has no job for. */
  WORKER_RECOVERY_INTERVAL_MS: z.coerce.number().int().min(1000).max(3_600_000).default(10_000),
  // --- end runs and sweeps worker ---
  // --- fault drills only (npm run test:soak; worker/drill-hold.ts, docs/reliability.md "Drill hooks") ---
  /** 1: this worker honours the drill hooks below. Off unless set; in production mode also needs TRISKEL_STAND_INS=1. */
  TRISKEL_DRILLS: z
    .enum(["0", "1"], { message: "must be 0 or 1" })
    .default("0")
    .transform((v) => v === "1"),
  /** Drill hook: the worker waits this long after the engine's finish, just before a job's finishing transaction (0: never). */
  TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: z.coerce.number().int().min(0).max(3_600_000).default(0),
  /** Where the drill hook writes its marker files (one per held job); unset: log lines only. */
  TRISKEL_DRILL_DIR: z.string().min(1).optional(),
});

export type Env = z.infer<typeof envSchema>;

/**
 * The keys and secrets the scripts give the local stand-ins (scripts/env.d/*.sh). They are in
 * this repository for anyone to read, so they sign nothing that matters: a deployment sets its
 * own, and a process in production mode refuses them unless TRISKEL_STAND_INS=1 says it runs
 * against the stand-ins on purpose. tests/unit/env.test.ts checks the scripts use these values.
 */
export const STAND_IN_VALUES = {
  STRIPE_SECRET_KEY: "sk_test_triskel_local_stand_in",
  STRIPE_WEBHOOK_SECRET: "whsec_triskel_local_stand_in_secret",
  CLERK_SECRET_KEY: "sk_live_triskel_local_stand_in",
  CLERK_WEBHOOK_SECRET: "whsec_dHJpc2tlbC1sb2NhbC1jbGVyay1zdGFuZC1pbg",
  NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY: "pk_live_Y2xlcmsudHJpc2tlbC5sb2NhbCQ",
} as const satisfies Partial<Record<keyof Env, string>>;

const isLoopbackHost = (host: string) => /^(localhost|127(\.\d{1,3}){3}|::1|\[::1\])$/i.test(host);

/**
 * Combinations no single variable shows: the development secrets with real keys, the stand-ins
 * in production mode. Each problem names the variable to change.
 */
export function deploymentProblems(
  e: Env,
): { name: keyof typeof STAND_IN_VALUES | "CLERK_FAKE_URL" | "STRIPE_API_HOST" | "TRISKEL_DRILLS"; message: string }[] {
  const problems: ReturnType<typeof deploymentProblems> = [];
  const production = e.NODE_ENV === "production";
  // Stripe: a live key, or production mode against Stripe itself (no host: api.stripe.com).
  const liveStripeKey = /^(sk|rk)_live_/.test(e.STRIPE_SECRET_KEY ?? "");
  const realStripeApi = !isLoopbackHost(e.STRIPE_API_HOST ?? "api.stripe.com");
  if (e.STRIPE_WEBHOOK_SECRET === STAND_IN_VALUES.STRIPE_WEBHOOK_SECRET && (liveStripeKey || (production && realStripeApi))) {
    problems.push({
      name: "STRIPE_WEBHOOK_SECRET",
      message:
        "is the local stand-in's development secret, which anyone can read in this repository, while " +
        (liveStripeKey ? "STRIPE_SECRET_KEY is a live key" : `production mode talks to ${e.STRIPE_API_HOST ?? "api.stripe.com"}`) +
        "; set the signing secret of your webhook endpoint (Stripe dashboard, Webhooks; docs/billing.md)",
    });
  }
  // Clerk: a real secret key (not the stand-in's) with the stand-in's webhook secret.
  const realClerkKey = Boolean(e.CLERK_SECRET_KEY) && e.CLERK_SECRET_KEY !== STAND_IN_VALUES.CLERK_SECRET_KEY;
  if (e.CLERK_WEBHOOK_SECRET === STAND_IN_VALUES.CLERK_WEBHOOK_SECRET && realClerkKey) {
    problems.push({
      name: "CLERK_WEBHOOK_SECRET",
      message:
        "is the local stand-in's development secret while CLERK_SECRET_KEY is a real Clerk key; " +
        "set the signing secret of your Clerk webhook endpoint (docs/accounts.md)",
    });
  }
  if (production && !e.TRISKEL_STAND_INS) {
    const hint = "a deployment sets its own (docs/accounts.md, docs/billing.md); only local runs against fakes/ set TRISKEL_STAND_INS=1";
    for (const name of Object.keys(STAND_IN_VALUES) as (keyof typeof STAND_IN_VALUES)[]) {
      if (e[name] === STAND_IN_VALUES[name] && !problems.some((p) => p.name === name))
        problems.push({ name, message: `is the local stand-in's value, refused in production mode; ${hint}` });
    }
    if (e.CLERK_FAKE_URL)
      problems.push({ name: "CLERK_FAKE_URL", message: `points the app at the local sign-in stand-in, refused in production mode; unset it, or ${hint}` });
    if (e.STRIPE_API_HOST && !realStripeApi)
      problems.push({
        name: "STRIPE_API_HOST",
        message: `is a loopback address (the local payments stand-in), refused in production mode; unset it for Stripe, or ${hint}`,
      });
    // The fault drills' hooks (worker/drill-hold.ts) never run in a deployment: it refuses to start with them.
    if (e.TRISKEL_DRILLS)
      problems.push({
        name: "TRISKEL_DRILLS",
        message: `turns on the fault drills' hooks, refused in production mode; unset it (drills run only against the stand-ins, TRISKEL_STAND_INS=1)`,
      });
  }
  return problems;
}

export class EnvError extends Error {}

const shown = (value: string | undefined) =>
  value === undefined || value === "" ? "is missing" : `is invalid (${JSON.stringify(value.length > 60 ? value.slice(0, 60) + "…" : value)})`;

/** Parses an environment; throws EnvError whose message is one line per bad variable. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => {
      const name = issue.path.join(".");
      return `environment variable ${name} ${shown(source[name])}: ${issue.message}`;
    });
    throw new EnvError(lines.join("\n"));
  }
  const problems = deploymentProblems(parsed.data);
  if (problems.length) throw new EnvError(problems.map((p) => `environment variable ${p.name} ${shown(source[p.name])}: ${p.message}`).join("\n"));
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
