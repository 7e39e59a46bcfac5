// Limits on sign-in, password reset, invitations and lab-file uploads. Limits come from the
// environment so tests and benchmarks can raise them. In memory: one app server keeps its own
// counters; several servers behind a balancer each enforce the limit. Under server.js's workers
// the counters live in its primary process, so a limit holds for the server, not per worker.
import cluster from "node:cluster";
import { RateLimiterCluster, RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";
import { env } from "./env";

const limiter = (keyPrefix: string, points: number) =>
  cluster.isWorker
    ? new RateLimiterCluster({ keyPrefix, points, duration: env.RATE_LIMIT_WINDOW_S, timeoutMs: 3_000 })
    : new RateLimiterMemory({ points, duration: env.RATE_LIMIT_WINDOW_S });

const limiters = {
  signIn: limiter("sign-in", env.RATE_LIMIT_SIGN_IN),
  reset: limiter("reset", env.RATE_LIMIT_RESET),
  invite: limiter("invite", env.RATE_LIMIT_INVITE),
  // Per user: 60 files per 10 minutes is far above a technician's busiest afternoon.
  upload: limiter("upload", env.RATE_LIMIT_UPLOAD),
};

export type LimitKind = keyof typeof limiters;

/** What the refusal counts, in the user's words. */
const COUNTED: Record<LimitKind, string> = { signIn: "attempts", reset: "attempts", invite: "attempts", upload: "uploads" };

/** Consumes one attempt; returns null when allowed, or a sentence saying when to retry. */
export async function consumeAttempt(kind: LimitKind, key: string): Promise<string | null> {
  try {
    await limiters[kind].consume(key.toLowerCase());
    return null;
  } catch (rejection) {
    if (!(rejection instanceof RateLimiterRes)) throw rejection;
    const minutes = Math.max(1, Math.ceil(rejection.msBeforeNext / 60_000));
    return `Too many ${COUNTED[kind]}. Please wait ${minutes} minute${minutes === 1 ? "" : "s"} and try again.`;
  }
}
