import type { Permission } from "~/permissions";

/**
 * The sections of a trial, in the order a trial's life runs. Each tab names the permission
 * needed to see it; the trial layout shows only the tabs the member's role allows.
 */
export const TRIAL_TABS: { path: string; label: string; permission: Permission }[] = [
  { path: "", label: "Overview", permission: "results.view" },
  { path: "setup", label: "Setup", permission: "trials.edit" },
  { path: "treatments", label: "Treatments", permission: "results.view" },
  { path: "planning", label: "Power planning", permission: "trials.edit" },
  { path: "randomization", label: "Randomization", permission: "trials.edit" },
  { path: "plot-map", label: "Plot map", permission: "results.view" },
  { path: "application-sheet", label: "Application sheet", permission: "results.view" },
  { path: "lab-method", label: "Lab method", permission: "trials.edit" },
  { path: "sampling", label: "Sampling", permission: "samples.edit" },
  { path: "intake", label: "Lab intake", permission: "measurements.upload" },
  { path: "data", label: "Data", permission: "results.view" },
  { path: "results", label: "Results", permission: "results.view" },
  { path: "briefs", label: "Field briefs", permission: "results.view" },
  { path: "audit", label: "Audit log", permission: "results.view" },
];
