import { type RouteConfig, index, layout, route } from "@react-router/dev/routes";

export default [
  index("routes/landing.tsx"),
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-out", "routes/sign-out.tsx"),
  route("setup", "routes/setup.tsx"),
  route("forgot-password", "routes/forgot-password.tsx"),
  route("reset-password", "routes/reset-password.tsx"),
  route("invitations/:invitationId", "routes/invitation.tsx"),
  route("healthz", "routes/healthz.ts"),
  route("dev/mailbox", "routes/dev.mailbox.tsx"),
  layout("routes/app-layout.tsx", [
    route("home", "routes/home.tsx"),
    route("account", "routes/account.tsx"),
    route("programs/:programId", "routes/program.tsx"),
    route("programs/:programId/members", "routes/program.members.tsx"),
    route("trials/:trialId", "routes/trial-layout.tsx", [
      index("routes/trial.overview.tsx"),
    ]),
  ]),
  route("api/programs/:programId/trials", "routes/api.program-trials.ts"),
] satisfies RouteConfig;
