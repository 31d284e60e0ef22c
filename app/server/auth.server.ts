import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { APIError } from "better-auth/api";
import { organization } from "better-auth/plugins/organization";
import { and, eq, like } from "drizzle-orm";
import { verification } from "../db/schema/auth";
import { ac, isRole, ROLE_LABELS, ROLES, roles } from "../lib/access";
import { PASSWORD_MAX, PASSWORD_MIN, personName } from "../lib/auth-schemas";
import { teamName, teamSlug } from "../lib/team-schemas";
import { CLIENT_ADDRESS_HEADER } from "./client-address.server";
import { db, schema } from "./db.server";
import { env } from "./env.server";
import { invitationMail, passwordResetMail, sendMail, verificationMail } from "./mail.server";

const appUrl = env.APP_URL.replace(/\/$/, "");

/** The app's own schema decides what a name, slug or role may be; better-auth's endpoints obey it too. */
function checked<T>(schema: { safeParse(v: unknown): { success: true; data: T } | { success: false; error: { issues: Array<{ message: string }> } } }, value: unknown): T {
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw new APIError("BAD_REQUEST", { message: parsed.error.issues[0]?.message ?? "Invalid value." });
  return parsed.data;
}

/** Rakeline gives each member exactly one of its roles; better-auth would also take a comma list. */
function checkedRole(role: unknown): string {
  if (typeof role !== "string" || !isRole(role)) {
    throw new APIError("BAD_REQUEST", { message: `Choose one of the roles: ${ROLES.join(", ")}.` });
  }
  return role;
}

/** After a reset or a password change, no older reset link may still work. */
export async function invalidateResetTokens(userId: string): Promise<void> {
  await db.delete(verification).where(and(like(verification.identifier, "reset-password:%"), eq(verification.value, userId)));
}

export const auth = betterAuth({
  appName: "Rakeline",
  baseURL: appUrl,
  basePath: "/api/auth",
  secret: env.BETTER_AUTH_SECRET,
  trustedOrigins: [appUrl],
  database: drizzleAdapter(db, { provider: "mysql", schema }),
  telemetry: { enabled: false },
  emailAndPassword: {
    enabled: true,
    requireEmailVerification: true,
    minPasswordLength: PASSWORD_MIN,
    maxPasswordLength: PASSWORD_MAX,
    revokeSessionsOnPasswordReset: true,
    resetPasswordTokenExpiresIn: 60 * 60,
    sendResetPassword: async ({ user, token }) => {
      await sendMail(passwordResetMail(user.email, user.name, `${appUrl}/reset-password?token=${encodeURIComponent(token)}`));
    },
    onPasswordReset: async ({ user }) => {
      await invalidateResetTokens(user.id);
    },
  },
  emailVerification: {
    sendOnSignUp: true,
    sendOnSignIn: true,
    autoSignInAfterVerification: true,
    expiresIn: 24 * 60 * 60,
    sendVerificationEmail: async ({ user, url }) => {
      // better-auth verifies the token, signs the user in and sends them on to the callback: /verify
      // (with ?next= when the sign-up form carried one, e.g. back to an invitation).
      const link = new URL(url);
      const callback = link.searchParams.get("callbackURL");
      if (!callback || !callback.startsWith("/verify")) link.searchParams.set("callbackURL", "/verify");
      await sendMail(verificationMail(user.email, user.name, link.toString()));
    },
  },
  databaseHooks: {
    // Names are trimmed and NFC-normalised, then checked with the app's schema, on every way in.
    user: {
      create: { before: async (user) => ({ data: { ...user, name: checked(personName, user.name) } }) },
      update: {
        before: async (data) => (data.name === undefined ? undefined : { data: { ...data, name: checked(personName, data.name) } }),
      },
    },
  },
  // Shared by every app process (stateless servers): buckets live in the database, keyed on the client
  // address that scripts/serve.mjs resolved (app/server/client-address.server.ts).
  rateLimit: { enabled: env.AUTH_RATE_LIMIT === "on", window: 60, max: 100, storage: "database" },
  advanced: {
    ipAddress: { ipAddressHeaders: [CLIENT_ADDRESS_HEADER] },
    // better-auth turns its Origin/CSRF checks off under test runners by default; keep them on everywhere.
    disableOriginCheck: false,
    disableCSRFCheck: false,
    useSecureCookies: appUrl.startsWith("https://"),
    defaultCookieAttributes: { httpOnly: true, sameSite: "lax", secure: appUrl.startsWith("https://") },
    // Mail goes out after the answer: a request never waits on SMTP, so an answer's time says nothing
    // about whether an address has an account.
    backgroundTasks: {
      handler: (promise) => {
        void promise;
      },
    },
  },
  plugins: [
    organization({
      ac,
      roles,
      creatorRole: "owner",
      invitationExpiresIn: 7 * 24 * 60 * 60,
      cancelPendingInvitationsOnReInvite: true,
      sendInvitationEmail: async ({ id, email, role, organization: team, inviter }) => {
        const roleLabel = isRole(role) ? ROLE_LABELS[role] : role;
        await sendMail(invitationMail(email, inviter.user.name, team.name, roleLabel, `${appUrl}/invitations/${id}`));
      },
      organizationHooks: {
        beforeCreateOrganization: async ({ organization: team }) => ({
          data: { ...team, name: checked(teamName, team.name), slug: checked(teamSlug, team.slug) },
        }),
        beforeUpdateOrganization: async ({ organization: team }) => {
          const data = { ...team };
          if (team.name !== undefined) data.name = checked(teamName, team.name);
          if (team.slug !== undefined) data.slug = checked(teamSlug, team.slug);
          return { data };
        },
        beforeAddMember: async ({ member }) => ({ data: { ...member, role: checkedRole(member.role) } }),
        beforeUpdateMemberRole: async ({ newRole }) => ({ data: { role: checkedRole(newRole) } }),
        beforeCreateInvitation: async ({ invitation }) => ({ data: { ...invitation, role: checkedRole(invitation.role) } }),
      },
    }),
  ],
});

export type Auth = typeof auth;
