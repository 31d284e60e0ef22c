import { createAccessControl } from "better-auth/plugins/access";

// Rakeline's permission statements, declared once. They drive better-auth's organization plugin
// (app/server/auth.server.ts) and our own checks (requireMember in app/server/permissions.server.ts),
// and the UI uses can() to hide what a role cannot do. The server always re-checks.
//
// organization / invitation and member create|update|delete are the names better-auth's own team
// endpoints check; the rest are Rakeline's.
export const statements = {
  organization: ["update", "delete"],
  invitation: ["create", "cancel"],
  team: ["update", "delete"],
  member: ["invite", "update_role", "remove", "create", "update", "delete"],
  car: ["read", "create", "update", "delete"],
  setup: ["read", "create", "update"],
  session: ["read", "upload", "annotate", "delete"],
  share: ["create", "revoke"],
  compare: ["read"],
} as const;

export const ac = createAccessControl(statements);

type Statements = typeof statements;
/** A permission request, e.g. `{ car: ["update"] }`: every listed action must be granted. */
export type Permission = { [R in keyof Statements]?: Statements[R][number][] };

export const ROLES = ["owner", "engineer", "analyst", "driver"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  owner: "Owner",
  engineer: "Engineer",
  analyst: "Analyst",
  driver: "Driver",
};

export const ROLE_SUMMARIES: Record<Role, string> = {
  owner: "Everything, including members, roles and team settings.",
  engineer: "Drops logs, edits cars and setups, creates Brief links, reads all team data.",
  analyst: "Reads all team data, compares stints, annotates sessions.",
  driver: "Sees the Garage (cars and setups) and what is shared with or assigned to them.",
};

const readAll = {
  car: ["read"],
  setup: ["read"],
  session: ["read"],
  compare: ["read"],
} as const;

export const roles = {
  // The owner holds every statement.
  owner: ac.newRole(statements),
  engineer: ac.newRole({
    ...readAll,
    car: ["read", "create", "update"],
    setup: ["read", "create", "update"],
    session: ["read", "upload", "annotate"],
    share: ["create", "revoke"],
  }),
  analyst: ac.newRole({
    ...readAll,
    session: ["read", "annotate"],
  }),
  // Sessions reach a driver only through a Brief link or an assignment, checked where those live.
  driver: ac.newRole({
    car: ["read"],
    setup: ["read"],
  }),
} satisfies Record<Role, unknown>;

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}

/** Whether `role` holds every action in `permission`. Unknown roles hold nothing. */
export function can(role: string | null | undefined, permission: Permission): boolean {
  if (!isRole(role)) return false;
  if (Object.keys(permission).length === 0) return false;
  return roles[role].authorize(permission as Record<string, string[]>).success;
}
