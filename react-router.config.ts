import type { Config } from "@react-router/dev/config";

export default {
  // Server-side rendering on: loaders and actions run on the server, pages arrive rendered.
  ssr: true,
} satisfies Config;
