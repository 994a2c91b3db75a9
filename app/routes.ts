import { type RouteConfig, index, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("library", "routes/library.tsx"),
  route("mechanisms", "routes/mechanisms.tsx"),
  route("runs", "routes/runs.tsx"),
  route("data", "routes/data.tsx"),
  route("analysis", "routes/analysis.tsx"),

  // Accounts, groups and sign-in
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-out", "routes/sign-out.ts"),
  route("auth/oidc", "routes/auth.oidc.ts"),
  route("auth/oidc/callback", "routes/auth.oidc.callback.ts"),
  route("register", "routes/register.tsx"),
  route("verify-email", "routes/verify-email.tsx"),
  route("forgot-password", "routes/forgot-password.tsx"),
  route("reset-password", "routes/reset-password.tsx"),
  route("invitations/accept", "routes/invitations.accept.tsx"),
  route("settings", "routes/settings.tsx"),
  route("settings/tokens", "routes/settings.tokens.tsx"),
  route("groups", "routes/groups.tsx"),
  route("groups/:slug", "routes/groups.$slug.tsx"),
  route("admin/users", "routes/admin.users.tsx"),
  route("dev/mailbox", "routes/dev.mailbox.tsx"),

  // REST API (resource routes)
  route("api/v1/health", "routes/api.v1.health.ts"),
  route("api/v1/rates", "routes/api.v1.rates.ts"),
  route("api/v1/simulate", "routes/api.v1.simulate.ts"),
  route("api/v1/me", "routes/api.v1.me.ts"),
  route("api/v1/runs", "routes/api.v1.runs.ts"),
  route("api/v1/runs/:id", "routes/api.v1.runs.$id.ts"),
  route("api/v1/runs/:id/cancel", "routes/api.v1.runs.$id.cancel.ts"),
  route("api/v1/runs/:id/results.csv", "routes/api.v1.runs.$id.results-csv.ts"),
  route("api/v1/*", "routes/api.v1.not-found.ts"),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
