import { type RouteConfig, index, prefix, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("healthz", "routes/api/healthz.ts"),
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-in/link/:token", "routes/sign-in-link.tsx"),
  route("sign-up", "routes/sign-up.tsx"),
  route("sign-out", "routes/sign-out.tsx"),
  route("forgot-password", "routes/forgot-password.tsx"),
  route("reset-password/:token", "routes/reset-password.tsx"),
  route("invitations/:token", "routes/invitations.$token.tsx"),
  route("account", "routes/account.tsx"),
  route("courses/new", "routes/courses.new.tsx"),
  // Every course page sits in the course frame (its name and rooms); each still checks access itself.
  route("courses/:courseId", "routes/courses.$courseId.tsx", [
    index("routes/courses.$courseId._index.tsx"),
    route("settings", "routes/courses.$courseId.settings.tsx"),
    route("members", "routes/courses.$courseId.members.tsx"),
    route("members/:membershipId", "routes/courses.$courseId.members.$membershipId.tsx"),
    route("roster", "routes/courses.$courseId.roster.tsx"),
    route("audit", "routes/courses.$courseId.audit.tsx"),
    ...prefix("kits", [
      index("routes/courses.$courseId.kits._index.tsx"),
      route("new", "routes/courses.$courseId.kits.new.tsx"),
      route(":kitId", "routes/courses.$courseId.kits.$kitId._index.tsx"),
    ]),
    ...prefix("parts", [
      index("routes/courses.$courseId.parts._index.tsx"),
      route("new", "routes/courses.$courseId.parts.new.tsx"),
      route("import", "routes/courses.$courseId.parts.import.tsx"),
      route(":partId", "routes/courses.$courseId.parts.$partId.tsx"),
    ]),
    route("my-kit", "routes/courses.$courseId.my-kit.tsx"),
  ]),
  // Outside the frame: a printable page and file downloads.
  route("courses/:courseId/kits/:kitId/packing-slip", "routes/courses.$courseId.kits.$kitId.packing-slip.tsx"),
  route("courses/:courseId/roster-template.csv", "routes/courses.$courseId.roster-template[.]csv.ts"),
  route("courses/:courseId/parts/template.csv", "routes/courses.$courseId.parts.template[.]csv.ts"),
  route("courses/:courseId/inventory.csv", "routes/courses.$courseId.inventory[.]csv.ts"),
  route("api/v1/me", "routes/api/v1.me.ts"),
  route("dev/inbox", "routes/dev.inbox.tsx"),
  route("api/dev/emails", "routes/api/dev.emails.ts"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
