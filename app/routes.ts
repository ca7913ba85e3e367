import { type RouteConfig, index, route, prefix } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("healthz", "routes/api/healthz.ts"),

  route("sign-up", "routes/auth/sign-up.tsx"),
  route("sign-in", "routes/auth/sign-in.tsx"),
  route("sign-out", "routes/auth/sign-out.ts"),
  route("forgot-password", "routes/auth/forgot-password.tsx"),
  route("reset-password/:token", "routes/auth/reset-password.tsx"),
  route("invitations/:token", "routes/auth/invitation.tsx"),
  route("account", "routes/auth/account.tsx"),

  ...prefix("labs", [
    index("routes/labs/index.tsx"),
    route(":labId", "routes/labs/home.tsx"),
    route(":labId/members", "routes/labs/members.tsx"),
    route(":labId/invitations", "routes/labs/invitations.tsx"),
  ]),

  route("dev/mail", "routes/dev/mail.tsx"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
