// Runtime configuration, read once. Demo mode turns on demo accounts, the SMTP fake and /dev/mailbox.
import { z } from "zod";

const schema = z.object({
  DATABASE_URL: z.string().default("postgres://postgres@127.0.0.1:54329/tilthmark"),
  TILTHMARK_DEMO: z.string().optional(),
  TILTHMARK_BASE_URL: z.string().url().default("http://127.0.0.1:3000"),
  BETTER_AUTH_SECRET: z.string().min(32).optional(),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default("Tilthmark <no-reply@tilthmark.test>"),
  RATE_LIMIT_SIGN_IN: z.coerce.number().int().positive().default(10),
  RATE_LIMIT_RESET: z.coerce.number().int().positive().default(5),
  RATE_LIMIT_INVITE: z.coerce.number().int().positive().default(30),
  RATE_LIMIT_UPLOAD: z.coerce.number().int().positive().default(60),
  RATE_LIMIT_WINDOW_S: z.coerce.number().int().positive().default(600),
  INVITATION_TTL_HOURS: z.coerce.number().positive().default(72),
  /** Memory per server process for rendered responses (app/.server/response-cache.ts); 0 turns the cache off. */
  RESPONSE_CACHE_MB: z.coerce.number().int().nonnegative().default(64),
});

const parsed = schema.parse(process.env);
const demo = parsed.TILTHMARK_DEMO === "1";

if (!demo && !parsed.BETTER_AUTH_SECRET && process.env.NODE_ENV === "production") {
  throw new Error("BETTER_AUTH_SECRET (32+ characters) must be set outside demo mode.");
}

export const env = {
  ...parsed,
  demo,
  // A fixed secret is acceptable only for the local demo and tests.
  authSecret: parsed.BETTER_AUTH_SECRET ?? "tilthmark-demo-secret-not-for-production-use-0000",
};
