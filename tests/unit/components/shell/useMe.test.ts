// The UI's view of GET /api/v1/workspace (useMe): what it keeps of the answer, and which controls
// it offers per role, read from the permissions table the server enforces. The expected rights are
// the Roles table of product.md, copied by hand (as in tests/unit/shared/permissions.test.ts).
import { describe, expect, it } from "vitest";
import { canBill, canCreate, canManageOthers, normaliseMe } from "@/components/shell/useMe";
import { ACTIONS, can, ROLE_LABELS, ROLES, type Role } from "@/shared/permissions";
import type { WorkspaceDescription } from "@/shared/api";

function description(role: Role, name: string): WorkspaceDescription {
  return {
    workspace: { id: "w1", name: "Larkspur lab", slug: "larkspur", kind: "lab", plan: "lab", seats: 4, clerkOrgId: "org_1" },
    member: { id: "u1", email: "ada@larkspur.example", name, role, roleLabel: ROLE_LABELS[role] },
    via: "session",
    can: Object.fromEntries(ACTIONS.map((a) => [a, can(role, a)])) as WorkspaceDescription["can"],
  };
}

describe("useMe", () => {
  it("keeps the member, the workspace and the role of the answer; an empty name reads as none", () => {
    expect(normaliseMe(description("billing_admin", "Ada Brook"))).toEqual({
      user: { id: "u1", name: "Ada Brook", email: "ada@larkspur.example" },
      workspace: { id: "w1", name: "Larkspur lab", plan: "lab" },
      role: "billing_admin",
    });
    expect(normaliseMe(description("viewer", "")).user.name).toBeNull();
  });

  it("offers creating to Owner and Researcher, billing to Owner and Billing admin, others' work to the Owner", () => {
    const offered = (test: (r?: Role) => boolean) => ROLES.filter((r) => test(r));
    expect(offered(canCreate)).toEqual(["owner", "researcher"]);
    expect(offered(canBill)).toEqual(["owner", "billing_admin"]);
    expect(offered(canManageOthers)).toEqual(["owner"]);
    // Before the answer arrives (no role yet) nothing is offered.
    for (const test of [canCreate, canBill, canManageOthers]) expect(test(undefined)).toBe(false);
  });
});
