import { type RouteConfig, index } from "@react-router/dev/routes";

export default [
  // Signed-out landing page.
  index("routes/home/landing.tsx"),
] satisfies RouteConfig;
