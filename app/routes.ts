import { type RouteConfig, index, prefix, route } from "@react-router/dev/routes";

export default [
  // Signed out: what Rakeline does. Signed in: straight on to the user's team.
  index("routes/home/landing.tsx"),

  // Sign-in and account.
  route("sign-up", "routes/auth/sign-up.tsx"),
  route("sign-in", "routes/auth/sign-in.tsx"),
  route("sign-out", "routes/auth/sign-out.tsx"),
  route("verify", "routes/auth/verify.tsx"),
  route("forgot-password", "routes/auth/forgot-password.tsx"),
  route("reset-password", "routes/auth/reset-password.tsx"),
  route("account", "routes/account/account.tsx"),

  // Teams without a team in the URL.
  route("teams/new", "routes/teams/new.tsx"),
  route("invitations/:id", "routes/teams/invitation.tsx"),

  // Team pages: every link names its team. The layout draws the shell; each loader still calls requireMember.
  route("t/:teamSlug", "routes/teams/layout.tsx", [
    index("routes/teams/dashboard.tsx"),
    route("settings", "routes/teams/settings.tsx"),
  ]),

  // Development only (404 when NODE_ENV=production).
  ...prefix("dev", [route("mailbox", "routes/dev/mailbox.tsx"), route("mailbox/:id", "routes/dev/message.tsx")]),

  // Resource routes.
  route("api/auth/*", "routes/api/auth.ts"),

  // Anything else.
  route("*", "routes/home/not-found.tsx"),
] satisfies RouteConfig;
