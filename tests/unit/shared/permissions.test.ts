import { describe, expect, it } from "vitest";
import { ACTIONS, can, describeAction, lesserRole, ROLES, rolesAllowed, refusalReason, tokenRolesFor } from "@/shared/permissions";

// The expected values are the Roles table of product.md, copied by hand.
describe("role permissions (product.md, Roles)", () => {
  it("everyone sees results; only Owner and Researcher create work", () => {
    for (const r of ["owner", "billing_admin", "researcher", "viewer"] as const) expect(can(r, "results.view")).toBe(true);
    expect(can("owner", "work.create")).toBe(true);
    expect(can("researcher", "work.create")).toBe(true);
    expect(can("billing_admin", "work.create")).toBe(false);
    expect(can("viewer", "work.create")).toBe(false);
  });

  it("billing is Owner and Billing admin; members are Owner only, seats also Billing admin", () => {
    expect(can("billing_admin", "billing.manage")).toBe(true);
    expect(can("researcher", "billing.manage")).toBe(false);
    expect(can("billing_admin", "members.manage")).toBe(false);
    expect(can("billing_admin", "seats.manage")).toBe(true);
    expect(can("owner", "work.manageOthers")).toBe(true);
    expect(can("researcher", "work.manageOthers")).toBe(false);
  });

  it("ACTIONS lists each action of the table once; the Owner may do all of them, a Viewer only look", () => {
    expect(new Set(ACTIONS).size).toBe(ACTIONS.length);
    expect(ACTIONS.length).toBe(10);
    for (const a of ACTIONS) {
      expect(can("owner", a), a).toBe(true);
      expect(
        rolesAllowed(a).every((r) => ROLES.includes(r)),
        a,
      ).toBe(true);
      expect(describeAction(a), a).toMatch(/\w/);
    }
    expect(ACTIONS.filter((a) => can("viewer", a))).toEqual(["results.view", "tokens.own"]);
    // Compute use per member: Owner and Billing admin (product.md); a Researcher sees the group's totals and their own.
    expect(rolesAllowed("usage.members")).toEqual(["owner", "billing_admin"]);
    expect(rolesAllowed("usage.view")).toEqual(["owner", "billing_admin", "researcher"]);
  });

  it("a refusal names the role, the action and who may, in words; null when allowed", () => {
    expect(refusalReason("researcher", "work.create")).toBeNull();
    expect(refusalReason("viewer", "work.create")).toBe(
      "Your role (Viewer) cannot create networks, calculations, scans, datasets or fits; ask the group's Owner if you need to (allowed: Owner or Researcher).",
    );
    expect(refusalReason("viewer", "usage.view")).toContain("allowed: Owner, Billing admin or Researcher");
    for (const a of ACTIONS) for (const r of ROLES) expect(refusalReason(r, a) === null, `${r} ${a}`).toBe(can(r, a));
  });

  it("a token never outranks its member", () => {
    expect(tokenRolesFor("viewer")).toEqual(["viewer"]);
    expect(tokenRolesFor("researcher")).toEqual(["researcher", "viewer"]);
    expect(lesserRole("owner", "viewer")).toBe("viewer");
    expect(lesserRole("researcher", "billing_admin")).toBe("viewer");
  });
});
