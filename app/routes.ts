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

    // Garage: cars, corner weights and versioned setup sheets.
    ...prefix("garage", [
      index("routes/garage/cars.tsx"),
      route("new", "routes/garage/car-new.tsx"),
      route("import", "routes/garage/import.tsx"),
      route(":carId", "routes/garage/car.tsx"),
      route(":carId/edit", "routes/garage/car-edit.tsx"),
      route(":carId/setups/new", "routes/garage/setup-new.tsx"),
      route(":carId/setups/:setupId", "routes/garage/setup.tsx"),
      route(":carId/setups/:setupId/edit", "routes/garage/setup-edit.tsx"),
      route(":carId/setups/:setupId/diff", "routes/garage/setup-diff.tsx"),
    ]),

    // Sessions list (sort, filter, pages in the URL) and the team's venues.
    route("sessions", "routes/sessions/list.tsx"),
    route("venues", "routes/sessions/venues.tsx"),
    // Drop a log: read in the browser's engine worker, uploaded, stored as a session.
    route("sessions/new", "routes/sessions/new.tsx"),
    // Brief links: one session shared read-only with a driver (engineer, owner).
    route("briefs", "routes/brief/briefs.tsx"),
    // The owner's audit log of the team.
    route("audit", "routes/audit/audit.tsx"),
    // Balance report (one session).
    route("sessions/:sessionId", "routes/sessions/session.tsx"),
    // Compare: sessions side by side (?ids=a,b,… and the picker's filters in the URL).
    route("compare", "routes/compare/compare.tsx"),
  ]),

  // A Driver brief, opened from its link without signing in.
  route("brief/:token", "routes/brief/brief.tsx"),
  // …and from the dashboard of the driver it was sent to (signed in).
  route("brief/shared/:briefId", "routes/brief/shared.tsx"),

  // All of a team's data as one archive (owner).
  route("t/:teamSlug/export.zip", "routes/teams/export.ts"),

  // Development only (404 when NODE_ENV=production).
  ...prefix("dev", [route("mailbox", "routes/dev/mailbox.tsx"), route("mailbox/:id", "routes/dev/message.tsx")]),

  // Resource routes.
  // Health of this process (liveness, and readiness with the database): for the proxy and monitoring.
  route("healthz", "routes/health/healthz.ts"),
  route("readyz", "routes/health/readyz.ts"),
  route("api/auth/*", "routes/api/auth.ts"),
  // Garage: car list, CAR.json export (car + one setup version) and import.
  route("api/t/:teamSlug/cars", "routes/api/cars.ts"),
  route("api/t/:teamSlug/cars/import", "routes/api/cars-import.ts"),
  route("api/t/:teamSlug/cars/:carId/setups/:setupId/car.json", "routes/api/cars-export.ts"),
  // Headless ingest: per-user API tokens scoped to one team.
  route("api/tokens", "routes/api/tokens.ts"),
  route("api/tokens/:id", "routes/api/token.ts"),
  // Drop a log: the raw file, then the session (details, map, the browser's summary); saved Channel maps.
  route("api/t/:teamSlug/uploads", "routes/api/uploads.ts"),
  route("api/t/:teamSlug/sessions", "routes/api/team-sessions.ts"),
  route("api/t/:teamSlug/logger-profiles", "routes/api/logger-profiles.ts"),
  // Headless ingest (POST, API token) and the session list (GET, token or cookie).
  route("api/sessions", "routes/api/sessions.ts"),

  // Data API of the Balance report and Compare (token or cookie; see /api/openapi.json).
  route("api/sessions/:sessionId", "routes/api/session-summary.ts"),
  route("api/sessions/:sessionId/bands.csv", "routes/api/session-bands-csv.ts"),
  route("api/sessions/:sessionId/traces", "routes/api/session-traces.ts"),
  route("api/compare", "routes/api/compare.ts"),
  route("api/cars", "routes/api/cars-list.ts"),
  route("api/cars/:carId/setups", "routes/api/cars-setups.ts"),
  route("api/openapi.json", "routes/api/openapi.ts"),
  // Deleting a session (owner; confirm=yes): rows, raw upload and raw file.
  route("api/t/:teamSlug/sessions/:sessionId/delete", "routes/api/session-delete.ts"),
  // Re-analysis of a stored session (a setup-version correction or a new engine): the job worker reads the file again.
  route("api/t/:teamSlug/sessions/:sessionId/reanalyse", "routes/api/session-reanalyse.ts"),

  // Anything else: JSON under /api/, the not-found page elsewhere.
  route("api/*", "routes/api/not-found.ts"),
  route("*", "routes/home/not-found.tsx"),
] satisfies RouteConfig;
