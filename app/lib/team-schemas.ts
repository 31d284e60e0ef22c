import { z } from "zod";
import { ROLES } from "./access";

// Team forms, shared by the pages and their actions.
export const SLUG_PATTERN = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

/**
 * A team page's path: the slug is one encoded path segment, so no stored value can climb out of /t/
 * (a slug like "a/../../sign-out" stays "/t/a%2F..%2F..%2Fsign-out"). `rest` starts with "/" or is empty.
 */
export function teamPath(slug: string, rest = ""): string {
  return `/t/${encodeURIComponent(slug)}${rest}`;
}

export function slugify(name: string): string {
  return name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40)
    .replace(/-+$/g, "");
}

export const teamName = z
  .string({ error: "Enter a team name." })
  .normalize("NFC")
  .trim()
  .min(2, "The team name is too short: use at least 2 characters.")
  .max(80, "The team name is too long: use at most 80 characters.");

export const teamSlug = z
  .string({ error: "Enter a web address for the team." })
  .normalize("NFC")
  .trim()
  .toLowerCase()
  .min(2, "The address is too short: use at least 2 characters.")
  .max(40, "The address is too long: use at most 40 characters.")
  .regex(SLUG_PATTERN, "Use lower-case letters, digits and single hyphens only (for example kestrel-racing).");

export const createTeamSchema = z.object({ name: teamName, slug: teamSlug });

export const renameTeamSchema = z.object({ intent: z.literal("rename"), name: teamName });

const role = z.enum(ROLES, { error: `Choose one of the roles: ${ROLES.join(", ")}.` });

export const inviteSchema = z.object({
  intent: z.literal("invite"),
  email: z
    .string({ error: "Enter the e-mail address to invite." })
    .trim()
    .min(1, "Enter the e-mail address to invite.")
    .pipe(z.email({ error: "That is not a valid e-mail address (expected something like name@example.com)." }))
    .transform((v) => v.toLowerCase()),
  role,
});

export const changeRoleSchema = z.object({ intent: z.literal("change-role"), memberId: z.string().min(1), role });
export const removeMemberSchema = z.object({ intent: z.literal("remove-member"), memberId: z.string().min(1) });
export const revokeInvitationSchema = z.object({ intent: z.literal("revoke-invitation"), invitationId: z.string().min(1) });

export const settingsActionSchema = z.discriminatedUnion("intent", [
  renameTeamSchema,
  inviteSchema,
  changeRoleSchema,
  removeMemberSchema,
  revokeInvitationSchema,
]);
export type SettingsAction = z.infer<typeof settingsActionSchema>;
