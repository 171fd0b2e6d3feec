/**
 * Which paths the app's origin forwards to the sign-in service's Frontend API (the local
 * stand-in, reached by the browser same-origin at /__clerk through the rewrite in
 * next.config.ts). Only what clerk-js calls from the browser: the environment, the client
 * (sign-ins, sign-ups, sessions, tokens, handshake) and the signed-in user's own `me` paths.
 * Everything else under /__clerk (users, organizations, memberships, JWKS: the Backend API the
 * server SDK reaches on CLERK_API_URL; the stand-in's test helpers) answers 404 at the app
 * (src/proxy.ts). Pure: no Node built-ins, so the proxy and next.config.ts can both use it.
 */
export const CLERK_PROXY_PREFIX = "/__clerk";

/** The Frontend API roots clerk-js uses; each may be followed by plain path segments. */
export const FRONTEND_API_ROOTS = ["environment", "client", "me"] as const;

const FRONTEND_PATH = new RegExp(`^/v1/(${FRONTEND_API_ROOTS.join("|")})(/[A-Za-z0-9_-]+)*/?$`);

/** True for a path below /__clerk (without the prefix) that the browser may reach, e.g. `/v1/client/sign_ins`. Encoded or dotted segments never are. */
export function isFrontendApiPath(path: string): boolean {
  return FRONTEND_PATH.test(path);
}

/** True for any path the /__clerk proxy is asked about (any letter case, as the rewrites match). */
export function isClerkProxyPath(pathname: string): boolean {
  return /^\/__clerk(\/|$)/i.test(pathname);
}
