// better-auth: e-mail + password sessions in PostgreSQL; the organization plugin holds
// programs, members and invitations with Tilthmark's roles. The HTTP handler is not mounted:
// Tilthmark's own actions call auth.api so every request passes through the one guard.
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { createAccessControl } from "better-auth/plugins/access";
import { organization } from "better-auth/plugins/organization";
import { defaultStatements } from "better-auth/plugins/organization/access";
import { PERMISSIONS, permissionsOf, ROLES, type Permission, type Role } from "~/permissions";
import { db, schema } from "./db";
import { env } from "./env";
import { sendInvitationMail, sendPasswordResetMail } from "./mail";

/**
 * Sessions last 14 days; one used more than a day after its last refresh is extended (better-auth
 * writes the new expiry and sets the cookie again).
 */
export const SESSION_TIMES = { expiresIn: 60 * 60 * 24 * 14, updateAge: 60 * 60 * 24 };

// better-auth's own statements (needed by its member and invitation endpoints) plus ours.
const statements = {
  ...defaultStatements,
  tilthmark: Object.keys(PERMISSIONS) as Permission[],
} as const;
const ac = createAccessControl(statements);

function roleStatements(role: Role) {
  const base = { tilthmark: permissionsOf(role) };
  if (role !== "owner") return base;
  return {
    ...base,
    organization: ["update", "delete"],
    member: ["create", "update", "delete"],
    invitation: ["create", "cancel"],
  } as const;
}

const roles = Object.fromEntries(ROLES.map((role) => [role, ac.newRole(roleStatements(role) as never)])) as unknown as Record<
  Role,
  ReturnType<typeof ac.newRole>
>;

export const auth = betterAuth({
  appName: "Tilthmark",
  baseURL: env.TILTHMARK_BASE_URL,
  secret: env.authSecret,
  database: drizzleAdapter(db, {
    provider: "pg",
    schema: {
      user: schema.users,
      session: schema.sessions,
      account: schema.accounts,
      verification: schema.verifications,
      organization: schema.programs,
      member: schema.members,
      invitation: schema.invitations,
    },
  }),
  emailAndPassword: {
    enabled: true,
    // Accounts are created only by first-run setup and by accepting an invitation.
    disableSignUp: true,
    minPasswordLength: 10,
    maxPasswordLength: 128,
    resetPasswordTokenExpiresIn: 60 * 60,
    revokeSessionsOnPasswordReset: true,
    sendResetPassword: async ({ user, token }) => {
      await sendPasswordResetMail(user.email, user.name, token);
    },
  },
  user: {
    additionalFields: {
      isAdmin: { type: "boolean", defaultValue: false, input: false },
      unitSystem: { type: "string", defaultValue: "si", input: false },
      notifyBriefs: { type: "boolean", defaultValue: true, input: false },
    },
  },
  session: SESSION_TIMES,
  // Tilthmark applies its own limits in its actions (app/.server/rate-limit.ts).
  rateLimit: { enabled: false },
  advanced: { useSecureCookies: env.TILTHMARK_BASE_URL.startsWith("https://") },
  telemetry: { enabled: false },
  plugins: [
    organization({
      ac,
      roles,
      creatorRole: "owner",
      allowUserToCreateOrganization: async (user) => Boolean((user as { isAdmin?: boolean }).isAdmin),
      invitationExpiresIn: env.INVITATION_TTL_HOURS * 60 * 60,
      cancelPendingInvitationsOnReInvite: true,
      sendInvitationEmail: async ({ id, email, role, organization, inviter }) => {
        await sendInvitationMail({
          to: email,
          invitationId: id,
          role,
          programName: organization.name,
          inviterName: inviter.user.name,
        });
      },
    }),
  ],
});

/** Turns the Set-Cookie headers of a better-auth call into a Cookie header for a follow-up call. */
export function cookieHeaderFrom(setCookies: Headers): Headers {
  const pairs = setCookies.getSetCookie().map((c) => c.split(";")[0]);
  return new Headers({ cookie: pairs.join("; ") });
}
