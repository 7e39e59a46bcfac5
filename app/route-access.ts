// Who may read each route (its loader) and who may post to it (its action), declared once beside
// the permissions. The access-matrix browser test asks and posts to every route as every demo role,
// as a member of another program and signed out, and fails when a route in app/routes.ts has no
// entry here or answers a post without a declared action.
import type { Permission } from "./permissions";

export type RouteAccess =
  | { kind: "public" }
  | { kind: "demo-only" }
  | { kind: "signed-in" }
  /** The administrator of the install (creates programs). */
  | { kind: "admin" }
  /** A field brief: briefs.view in its program, or anyone when its author made it public. */
  | { kind: "brief" }
  | { kind: "permission"; permission: Permission };

const open = { kind: "public" } as const;
const signedIn = { kind: "signed-in" } as const;
const can = (permission: Permission) => ({ kind: "permission", permission }) as const;

export const ROUTE_ACCESS: Record<string, RouteAccess> = {
  "/": open,
  "/sign-in": open,
  "/sign-out": signedIn,
  "/setup": open,
  "/forgot-password": open,
  "/reset-password": open,
  "/invitations/:invitationId": open,
  "/healthz": open,
  "/dev/mailbox": { kind: "demo-only" },
  "/briefs/:briefId": { kind: "brief" },
  "/briefs/:briefId/v/:version": { kind: "brief" },
  "/briefs/:briefId/summary.csv": { kind: "brief" },
  "/briefs/:briefId/v/:version/summary.csv": { kind: "brief" },
  "/home": signedIn,
  "/account": signedIn,
  "/programs/:programId": can("briefs.view"),
  "/programs/:programId/members": can("members.manage"),
  "/programs/:programId/trials/new": can("trials.edit"),
  "/programs/:programId/sites": can("results.view"),
  "/programs/:programId/sites/:siteId": can("results.view"),
  "/programs/:programId/amendments": can("results.view"),
  "/programs/:programId/amendments/:amendmentId": can("results.view"),
  "/programs/:programId/amendments/:amendmentId/batches/:batchId": can("results.view"),
  "/programs/:programId/blend-calculator": can("results.view"),
  "/programs/:programId/lab": can("results.view"),
  "/trials/:trialId": can("results.view"),
  "/trials/:trialId/results": can("results.view"),
  "/trials/:trialId/results/contrasts": can("results.view"),
  "/trials/:trialId/briefs": can("results.view"),
  "/trials/:trialId/lab-method": can("trials.edit"),
  "/trials/:trialId/setup": can("trials.edit"),
  "/trials/:trialId/treatments": can("results.view"),
  "/trials/:trialId/randomization": can("trials.edit"),
  "/trials/:trialId/plot-map": can("results.view"),
  "/trials/:trialId/application-sheet": can("results.view"),
  "/trials/:trialId/planning": can("trials.edit"),
  "/trials/:trialId/sampling": can("samples.edit"),
  "/trials/:trialId/sampling/sheet": can("samples.edit"),
  "/trials/:trialId/sampling/labels": can("samples.edit"),
  "/trials/:trialId/intake": can("measurements.upload"),
  "/trials/:trialId/intake/entry": can("measurements.upload"),
  "/trials/:trialId/intake/:uploadId": can("measurements.upload"),
  "/trials/:trialId/data": can("results.view"),
  "/trials/:trialId/data/sample": can("results.view"),
  "/trials/:trialId/audit": can("results.view"),
  "/trials/:trialId/export/:file": can("results.view"),
  "/trials/:trialId/plot-map.svg": can("results.view"),
  "/trials/:trialId/application-sheet.csv": can("results.view"),
  "/api/programs/:programId/trials": can("results.view"),
  "/api/trials/:trialId/results": can("results.view"),
  "/api/trials/:trialId/charts/season-means": can("results.view"),
  "/api/trials/:trialId/charts/plot-values": can("results.view"),
  "/api/trials/:trialId/charts/plot-map": can("results.view"),
  "/api/trials/:trialId/charts/depth-profile": can("results.view"),
  "/api/trials/:trialId/charts/stocks": can("results.view"),
  "/api/trials/:trialId/charts/diagnostics": can("results.view"),
  "/api/trials/:trialId/charts/contrasts": can("results.view"),
  "/api/trials/:trialId/layout": can("results.view"),
  "/api/trials/:trialId/sample-sheet.csv": can("samples.edit"),
  "/api/trials/:trialId/template.csv": can("measurements.upload"),
  "/api/trials/:trialId/uploads/:uploadId/original": can("results.view"),
  "/api/trials/:trialId/data.csv": can("results.view"),
  "/api/trials/:trialId/audit.csv": can("results.view"),
};

/**
 * Who may post to each route that has an action: the guard every post passes before its body is
 * read. Some intents ask for more (QC decisions need measurements.review); integration tests hold
 * those. A route missing here has no action and answers posts with 405.
 */
export const ACTION_ACCESS: Record<string, RouteAccess> = {
  "/sign-in": open,
  "/sign-out": signedIn,
  "/setup": open,
  "/forgot-password": open,
  "/reset-password": open,
  "/invitations/:invitationId": open,
  "/home": { kind: "admin" },
  "/account": signedIn,
  "/programs/:programId/members": can("members.manage"),
  "/programs/:programId/trials/new": can("trials.edit"),
  "/programs/:programId/sites": can("trials.edit"),
  "/programs/:programId/sites/:siteId": can("trials.edit"),
  "/programs/:programId/amendments": can("samples.edit"),
  "/programs/:programId/amendments/:amendmentId": can("samples.edit"),
  "/programs/:programId/amendments/:amendmentId/batches/:batchId": can("samples.edit"),
  "/programs/:programId/lab": can("samples.edit"),
  "/trials/:trialId/results/contrasts": can("trials.edit"),
  "/trials/:trialId/briefs": can("briefs.publish"),
  "/trials/:trialId/lab-method": can("trials.edit"),
  "/trials/:trialId/setup": can("trials.edit"),
  "/trials/:trialId/treatments": can("trials.edit"),
  "/trials/:trialId/randomization": can("trials.edit"),
  "/trials/:trialId/plot-map": can("trials.edit"),
  "/trials/:trialId/sampling": can("samples.edit"),
  "/trials/:trialId/intake": can("measurements.upload"),
  "/trials/:trialId/intake/entry": can("measurements.upload"),
  "/trials/:trialId/intake/:uploadId": can("measurements.upload"),
  "/trials/:trialId/data/sample": can("measurements.upload"),
};
