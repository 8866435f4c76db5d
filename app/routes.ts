import { type RouteConfig, index, prefix, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("signup", "routes/auth/signup.tsx"),
  route("signin", "routes/auth/signin.tsx"),
  route("signout", "routes/auth/signout.ts"),
  route("forgot", "routes/auth/forgot.tsx"),
  route("reset/:token", "routes/auth/reset.tsx"),
  route("explore", "routes/explore.tsx"),
  route("teach", "routes/teacher/dashboard.tsx"),
  route("me", "routes/student/home.tsx"),
  route("settings/tokens", "routes/settings.tsx"),
  route("host", "routes/live/host.tsx"),
  route("stage/:roomId", "routes/live/stage.tsx"),
  route("results/:roomId", "routes/live/results.tsx"),
  route("join", "routes/live/join.tsx"),
  route("play/:code", "routes/live/play.tsx"),
  ...prefix("admin", [index("routes/admin/school.tsx"), route("outbox", "routes/admin/outbox.tsx")]),
  ...prefix("api/v1", [
    route("me", "routes/api/me.ts"),
    route("spots", "routes/api/spots.ts"),
    route("spot-map", "routes/api/spot-map.ts"),
  ]),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
