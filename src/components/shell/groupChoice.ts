/**
 * The last-used group, remembered in this browser (a first-party cookie, a year long): the sign-in
 * form makes it the session's active group again, so a lab member who last worked in the lab
 * starts in the lab. Nothing secret is stored: only which group (a sign-in organization id, or
 * "personal"); the server still checks membership on every request.
 */
export const LAST_GROUP_COOKIE = "triskel_group";
const PERSONAL = "personal";
const YEAR_SECONDS = 365 * 24 * 3600;

export function rememberGroup(organizationId: string | null): void {
  document.cookie = `${LAST_GROUP_COOKIE}=${encodeURIComponent(organizationId ?? PERSONAL)}; path=/; max-age=${YEAR_SECONDS}; samesite=lax`;
}

/** The remembered group: an organization id, "personal", or undefined when none is remembered. */
export function rememberedGroup(cookie: string = document.cookie): string | undefined {
  const entry = cookie
    .split(";")
    .map((c) => c.trim())
    .find((c) => c.startsWith(`${LAST_GROUP_COOKIE}=`));
  return entry ? decodeURIComponent(entry.slice(LAST_GROUP_COOKIE.length + 1)) || undefined : undefined;
}

/**
 * The group a fresh session starts in: the remembered one while the person is still a member of
 * it; otherwise their first lab (a lab member's work is there), otherwise the personal group (null).
 */
export function groupToStartIn(remembered: string | undefined, organizationIds: readonly string[]): string | null {
  if (remembered === PERSONAL) return null;
  if (remembered && organizationIds.includes(remembered)) return remembered;
  return organizationIds[0] ?? null;
}
