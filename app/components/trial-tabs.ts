import type { Permission } from "~/permissions";

/**
 * The sections of a trial, in the order a trial's life runs. Each tab names the permission
 * needed to see it; the trial layout shows only the tabs the member's role allows.
 */
export const TRIAL_TABS: { path: string; label: string; permission: Permission }[] = [
  { path: "", label: "Overview", permission: "results.view" },
];
