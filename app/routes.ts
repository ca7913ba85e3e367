import { type RouteConfig, index, route, prefix } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("healthz", "routes/api/healthz.ts"),
  route("bench-floor", "routes/api/trivial.ts"),

  route("sign-up", "routes/auth/sign-up.tsx"),
  route("sign-in", "routes/auth/sign-in.tsx"),
  route("sign-out", "routes/auth/sign-out.ts"),
  route("forgot-password", "routes/auth/forgot-password.tsx"),
  route("reset-password/:token", "routes/auth/reset-password.tsx"),
  route("invitations/:token", "routes/auth/invitation.tsx"),
  route("account", "routes/auth/account.tsx"),
  route("bench", "routes/bench/queue.tsx"), // bench

  ...prefix("labs", [
    index("routes/labs/index.tsx"),
    route(":labId", "routes/labs/home.tsx"),
    route(":labId/members", "routes/labs/members.tsx"),
    route(":labId/invitations", "routes/labs/invitations.tsx"),
    route(":labId/audit", "routes/labs/audit.tsx"),
    route(":labId/settings", "routes/labs/settings.tsx"),
    route(":labId/quality", "routes/quality/quality.tsx"), // quality (owners, leads, analysts)
    route(":labId/quality/reference-readings.csv", "routes/api/reference-readings-csv.ts"),
    // protocols
    route(":labId/protocols", "routes/protocols/list.tsx"),
    route(":labId/protocols/new", "routes/protocols/new.tsx"),
    route(":labId/protocols/:protocolId", "routes/protocols/protocol.tsx"),
    route(":labId/protocols/:protocolId/compare", "routes/protocols/compare.tsx"),
    route(":labId/protocols/:protocolId/versions/:version", "routes/protocols/version.tsx"),
    route(":labId/protocols/:protocolId/versions/:version/print", "routes/protocols/print.tsx"),
    // planning
    route(":labId/planning/sample-size", "routes/labs/planning/sample-size.tsx"),
    // studies
    route(":labId/studies", "routes/studies/list.tsx"),
    route(":labId/studies/new", "routes/studies/new.tsx"),
    route(":labId/studies/:studyId", "routes/studies/study.tsx"),
    route(":labId/studies/:studyId/design/:step", "routes/studies/design.tsx"),
    route(":labId/studies/:studyId/randomize", "routes/studies/randomize.tsx"),
    route(":labId/studies/:studyId/start", "routes/studies/start.tsx"),
    route(":labId/studies/:studyId/labels", "routes/studies/labels.tsx"),
    route(":labId/studies/:studyId/schedule.csv", "routes/api/schedule-csv.ts"),
    // library (owners and leads only)
    route(":labId/blades", "routes/library/blades.tsx"),
    route(":labId/blades/new", "routes/library/blade-new.tsx"),
    route(":labId/blades/import", "routes/library/blade-import.tsx"),
    route(":labId/blades/export.csv", "routes/api/blades-export.ts"),
    route(":labId/blades/:bladeId", "routes/library/blade.tsx"),
    route(":labId/blades/:bladeId/edit", "routes/library/blade-edit.tsx"),
    route(":labId/media", "routes/library/media.tsx"),
    route(":labId/media/:mediumId", "routes/library/medium.tsx"),
    route(":labId/instruments", "routes/library/instruments.tsx"),
    route(":labId/instruments/:instrumentId", "routes/library/instrument.tsx"),
    route(":labId/instruments/:instrumentId/repeatability-readings.csv", "routes/api/precision-readings-csv.ts"), // owners, leads, analysts
    route(":labId/uploads", "routes/api/uploads.ts"),
    route(":labId/files/:fileId", "routes/api/file.ts"),
    // bench
    route(":labId/bench/runs/:runId", "routes/bench/run.tsx"), // bench
    route(":labId/bench/runs/:runId/photos/:fileId", "routes/bench/photo.ts"), // bench
    route(":labId/api/runs/:runId/readings", "routes/bench/api/readings.ts"), // bench
    route(":labId/api/runs/:runId/corrections", "routes/bench/api/corrections.ts"), // bench
    route(":labId/api/runs/:runId/events", "routes/bench/api/events.ts"), // bench
    route(":labId/api/runs/:runId/photos", "routes/bench/api/photos.ts"), // bench
    route(":labId/api/runs/:runId/import", "routes/bench/api/import.ts"), // bench
    route(":labId/api/runs/:runId/state", "routes/bench/api/state.ts"), // bench
    route(":labId/studies/:studyId/progress", "routes/bench/progress.tsx"), // bench
    route(":labId/studies/:studyId/progress.json", "routes/bench/api/progress.ts"), // bench
    route(":labId/studies/:studyId/preparation", "routes/bench/preparation.tsx"), // bench
    // results (owners, leads and analysts)
    route(":labId/results", "routes/results/list.tsx"),
    route(":labId/studies/:studyId/results", "routes/results/study-results.tsx"),
    route(":labId/studies/:studyId/results/unblind", "routes/results/unblind.tsx"),
    route(":labId/studies/:studyId/report", "routes/results/report.tsx"),
    route(":labId/api/studies/:studyId/analysis.json", "routes/api/study-analysis.ts"),
    route(":labId/api/studies/:studyId/readings.csv", "routes/api/study-readings-csv.ts"),
    route(":labId/api/studies/:studyId/outcomes.csv", "routes/api/study-outcomes-csv.ts"),
    route(":labId/api/studies/:studyId/bundle.json", "routes/api/study-bundle.ts"),
  ]),

  route("dev/mail", "routes/dev/mail.tsx"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
