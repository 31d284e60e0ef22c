// The permission matrix of the four roles. Expected grants are the role definitions of Rakeline's
// foundation issue (issue 2, item 6: owner everything; engineer uploads sessions, edits cars and
// setups, creates Brief links, reads all; analyst reads all, compares, annotates; driver reads only
// what is shared or assigned) and of the Garage issue (issue 4, item 6: owner and engineer edit cars
// and setups; analyst and driver read them). The AND rule over listed actions is better-auth's access-control
// rule (better-auth docs, "Access Control": a role is authorized when it holds every requested action).
import { describe, expect, it } from "vitest";
import { can, ROLES, roles, statements, type Permission, type Role } from "~/lib/access";

type Row = { permission: Permission; granted: Role[] };

const MATRIX: Row[] = [
  { permission: { team: ["update"] }, granted: ["owner"] },
  { permission: { team: ["delete"] }, granted: ["owner"] },
  { permission: { member: ["invite"] }, granted: ["owner"] },
  { permission: { member: ["update_role"] }, granted: ["owner"] },
  { permission: { member: ["remove"] }, granted: ["owner"] },
  { permission: { car: ["read"] }, granted: ["owner", "engineer", "analyst", "driver"] },
  { permission: { car: ["create"] }, granted: ["owner", "engineer"] },
  { permission: { car: ["update"] }, granted: ["owner", "engineer"] },
  { permission: { car: ["delete"] }, granted: ["owner"] },
  { permission: { setup: ["read"] }, granted: ["owner", "engineer", "analyst", "driver"] },
  { permission: { setup: ["create"] }, granted: ["owner", "engineer"] },
  { permission: { setup: ["update"] }, granted: ["owner", "engineer"] },
  { permission: { session: ["read"] }, granted: ["owner", "engineer", "analyst"] },
  { permission: { session: ["upload"] }, granted: ["owner", "engineer"] },
  { permission: { session: ["annotate"] }, granted: ["owner", "engineer", "analyst"] },
  { permission: { session: ["delete"] }, granted: ["owner"] },
  { permission: { share: ["create"] }, granted: ["owner", "engineer"] },
  { permission: { compare: ["read"] }, granted: ["owner", "engineer", "analyst"] },
];

describe("permission matrix", () => {
  for (const { permission, granted } of MATRIX) {
    const label = Object.entries(permission).map(([r, a]) => `${r}:${a!.join("+")}`).join(",");
    it(`${label} → ${granted.join(", ")}`, () => {
      for (const role of ROLES) expect(can(role, permission), `${role} ${label}`).toBe(granted.includes(role));
    });
  }

  it("owner holds every declared action", () => {
    for (const [resource, actions] of Object.entries(statements)) {
      for (const action of actions) expect(can("owner", { [resource]: [action] } as Permission), `${resource}:${action}`).toBe(true);
    }
  });

  it("a request for several actions needs all of them (better-auth's AND rule)", () => {
    expect(can("analyst", { session: ["read", "annotate"] })).toBe(true);
    expect(can("analyst", { session: ["read", "upload"] })).toBe(false);
    expect(can("engineer", { car: ["update"], session: ["delete"] })).toBe(false);
  });

  it("unknown roles and empty requests grant nothing", () => {
    expect(can("member", { car: ["read"] })).toBe(false);
    expect(can(undefined, { car: ["read"] })).toBe(false);
    expect(can("owner", {})).toBe(false);
  });

  it("only the owner holds the names better-auth's own team endpoints check", () => {
    // better-auth organization plugin: updating the organization checks organization:update,
    // inviting checks invitation:create, role changes member:update, removal member:delete.
    const pluginChecks: Permission[] = [
      { organization: ["update"] },
      { organization: ["delete"] },
      { invitation: ["create"] },
      { invitation: ["cancel"] },
      { member: ["create"] },
      { member: ["update"] },
      { member: ["delete"] },
    ];
    for (const p of pluginChecks) {
      expect(roles.owner.authorize(p as Record<string, string[]>).success).toBe(true);
      for (const role of ["engineer", "analyst", "driver"] as const) {
        expect(roles[role].authorize(p as Record<string, string[]>).success).toBe(false);
      }
    }
  });
});
