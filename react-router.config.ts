import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // Lets several checkouts or test runs on one machine build side by side.
  buildDirectory: process.env.TILTHMARK_BUILD_DIR ?? "build",
} satisfies Config;
