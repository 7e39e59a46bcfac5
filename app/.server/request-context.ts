// Per-request facts that outlive a single function call: who the request acts for, for the log.
import { AsyncLocalStorage } from "node:async_hooks";

export type RequestFacts = { userId: string | null };

export const requestFacts = new AsyncLocalStorage<RequestFacts>();

export function noteUser(userId: string) {
  const facts = requestFacts.getStore();
  if (facts) facts.userId = userId;
}
