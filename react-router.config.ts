import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // Lets several checkouts or test runs on one machine build side by side.
  buildDirectory: process.env.TILTHMARK_BUILD_DIR ?? "build",
  future: { v8_middleware: true },
} satisfies Config;
