import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { organization } from "better-auth/plugins/organization";
import { ac, isRole, ROLE_LABELS, roles } from "../lib/access";
import { PASSWORD_MAX, PASSWORD_MIN } from "../lib/auth-schemas";
import { db, schema } from "./db.server";
import { env } from "./env.server";
import { invitationMail, passwordResetMail, sendMail, verificationMail } from "./mail.server";

const appUrl = env.APP_URL.replace(/\/$/, "");

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
  rateLimit: { enabled: env.AUTH_RATE_LIMIT === "on", window: 60, max: 100 },
  advanced: {
    ipAddress: { ipAddressHeaders: [env.CLIENT_IP_HEADER] },
    // better-auth turns its Origin/CSRF checks off under test runners by default; keep them on everywhere.
    disableOriginCheck: false,
    disableCSRFCheck: false,
    useSecureCookies: appUrl.startsWith("https://"),
    defaultCookieAttributes: { httpOnly: true, sameSite: "lax" },
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
    }),
  ],
});

export type Auth = typeof auth;
