/** The JSON bodies the member and invitation endpoints accept (parsed in their route handlers; described in the API document). */
import { z } from "zod";
import { ROLES } from "@/shared/permissions";

/** POST /api/v1/workspace/members `{ email, role }`. */
export const inviteInput = z
  .object({
    email: z.string().trim().email("must be an e-mail address").max(320),
    role: z.enum(ROLES, { message: `must be one of ${ROLES.join(", ")}` }),
  })
  .strict();

/** PATCH /api/v1/workspace/members/{userId} `{ role }`. */
export const roleInput = z.object({ role: z.enum(ROLES, { message: `must be one of ${ROLES.join(", ")}` }) }).strict();

/** POST /api/v1/workspace/invitations/accept `{ token }`. */
export const acceptInvitationInput = z.object({ token: z.string().min(8, "must be the token from the invitation link").max(200) }).strict();
