// The one source of truth for roles and permissions (DESIGN.md "Users, roles, access").
// Shared by the server guard, better-auth's access control and the UI's role descriptions.

export const ROLES = ["owner", "researcher", "technician", "collaborator", "extension"] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = {
  "members.manage": ["owner"],
  "trials.edit": ["owner", "researcher"],
  "samples.edit": ["owner", "researcher", "technician"],
  "measurements.upload": ["owner", "researcher", "technician"],
  "measurements.review": ["owner", "researcher"],
  "results.view": ["owner", "researcher", "technician", "collaborator"],
  "briefs.publish": ["owner", "researcher"],
  "briefs.view": ["owner", "researcher", "technician", "collaborator", "extension"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function roleCan(role: string, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly string[]).includes(role);
}

export function permissionsOf(role: Role): Permission[] {
  return (Object.keys(PERMISSIONS) as Permission[]).filter((p) => roleCan(role, p));
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}

export const ROLE_LABELS: Record<Role, { label: string; summary: string }> = {
  owner: { label: "Owner", summary: "Runs the program: manages members and everything researchers can do." },
  researcher: { label: "Researcher", summary: "Designs trials, reviews lab data, analyses results, publishes field briefs." },
  technician: { label: "Technician", summary: "Records amendment batches and sampling, uploads lab results." },
  collaborator: { label: "Collaborator", summary: "Reads raw data, results and charts." },
  extension: { label: "Extension agent", summary: "Reads and downloads published field briefs." },
};
