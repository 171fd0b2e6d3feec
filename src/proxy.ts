// Next 16 "proxy" (formerly middleware): Clerk's clerkMiddleware reads the session on every page
// and API request, so `auth()` works in server code. Signed-out visitors of the signed-in area are
// sent to our sign-in page. Public pages, the health check, the API document and Bearer-token API calls pass untouched.
// Under /__clerk only the sign-in service's browser-facing Frontend API goes on to the rewrite in
// next.config.ts; its admin (Backend) API and the stand-in's helpers answer 404 here.
import "@/server/server-only";
import { clerkMiddleware, createRouteMatcher } from "@clerk/nextjs/server";
import { NextResponse, type NextFetchEvent, type NextRequest } from "next/server";
import { CLERK_PROXY_PREFIX, isClerkProxyPath, isFrontendApiPath } from "@/server/auth/frontend-api";

const isPublicPage = createRouteMatcher([
  "/",
  "/pricing(.*)",
  "/manual(.*)",
  "/status",
  "/sign-in(.*)",
  "/sign-up(.*)",
  "/sign-out(.*)",
  "/accept-invitation(.*)",
  // the Python client (public/clients/), fetched by scripts without a session
  "/clients/(.*)",
]);
const isApi = createRouteMatcher(["/api/(.*)"]);

const withClerk = clerkMiddleware(async (auth, req) => {
  // API routes answer 401 JSON themselves (getCaller); only pages redirect.
  if (isApi(req) || isPublicPage(req)) return;
  const { userId } = await auth();
  if (!userId) {
    const signIn = new URL("/sign-in", req.url);
    signIn.searchParams.set("redirect_url", req.nextUrl.pathname + req.nextUrl.search);
    return NextResponse.redirect(signIn);
  }
});

export async function proxy(req: NextRequest, event: NextFetchEvent) {
  const path = req.nextUrl.pathname;
  if (isClerkProxyPath(path)) {
    const rest = path.slice(CLERK_PROXY_PREFIX.length);
    if (path.startsWith(CLERK_PROXY_PREFIX) && isFrontendApiPath(rest)) return NextResponse.next();
    return NextResponse.json(
      {
        error: {
          code: "not_found",
          message: `${path} is not served here: the app forwards only the sign-in service's browser-facing paths under ${CLERK_PROXY_PREFIX}.`,
        },
      },
      { status: 404, headers: { "cache-control": "no-store" } },
    );
  }
  // Scripts with an API token never need a session; webhooks carry their own signature.
  if (path === "/api/v1/health" || path === "/api/v1/openapi.json" || path.startsWith("/api/webhooks/")) return NextResponse.next();
  if (/^Bearer\s+trk_/i.test(req.headers.get("authorization") ?? "")) return NextResponse.next();
  return sameUrlRewriteAsNext(req, await withClerk(req, event));
}

/**
 * clerkMiddleware passes its auth headers with a rewrite to the request's own URL. Behind
 * `next start -H 127.0.0.1`, Next sees that URL's host (localhost) as another origin and proxies
 * it over the network, which fails. The same request headers travel with `x-middleware-next`, so
 * a rewrite to the very same path is turned back into "continue".
 */
function sameUrlRewriteAsNext(req: NextRequest, res: Response | null | undefined | void): Response | undefined {
  if (!res) return undefined;
  const target = res.headers.get("x-middleware-rewrite");
  if (target) {
    const url = new URL(target, req.url);
    if (url.pathname === req.nextUrl.pathname && url.search === req.nextUrl.search) {
      res.headers.delete("x-middleware-rewrite");
      res.headers.set("x-middleware-next", "1");
    }
  }
  return res;
}

export const config = {
  matcher: [
    // Everything but Next internals, static files and the served clerk-js ...
    "/((?!_next|clerk/|.*\\.(?:css|js|map|png|jpg|jpeg|svg|ico|woff2?|txt|webmanifest)$).*)",
    // ... and every path of the sign-in proxy, whatever it ends with.
    "/__clerk/:path*",
  ],
};
