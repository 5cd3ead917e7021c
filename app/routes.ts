import { type RouteConfig, index, prefix, route } from "@react-router/dev/routes";

// Read when the app is built (and by the dev server): `npm start`, `npm run dev` and `npm test` build
// the demo, which has the development inbox; `npm run build`, the production build, does not.
const demoBuild = process.env.BENCHPOST_DEMO_BUILD === "1";

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
      route("problems", "routes/courses.$courseId.kits.problems._index.tsx"),
      route("problems/:problemId", "routes/courses.$courseId.kits.problems.$problemId.tsx"),
      route("tracking-import", "routes/courses.$courseId.kits.tracking-import.tsx"),
      route("overdue", "routes/courses.$courseId.kits.overdue.tsx"),
      route("check-in", "routes/courses.$courseId.kits.check-in.tsx"),
      route(":kitId", "routes/courses.$courseId.kits.$kitId._index.tsx"),
    ]),
    ...prefix("parts", [
      index("routes/courses.$courseId.parts._index.tsx"),
      route("new", "routes/courses.$courseId.parts.new.tsx"),
      route("import", "routes/courses.$courseId.parts.import.tsx"),
      route(":partId", "routes/courses.$courseId.parts.$partId.tsx"),
    ]),
    ...prefix("shipments", [
      index("routes/courses.$courseId.shipments._index.tsx"),
      route("new", "routes/courses.$courseId.shipments.new.tsx"),
      route(":shipmentId", "routes/courses.$courseId.shipments.$shipmentId.tsx"),
    ]),
    route("my-kit", "routes/courses.$courseId.my-kit.tsx"),
    route("my-address", "routes/courses.$courseId.my-address.tsx"),
    route("addresses/import", "routes/courses.$courseId.addresses.import.tsx"),
    route("labs", "routes/courses.$courseId.labs._index.tsx"),
    route("labs/new", "routes/courses.$courseId.labs.new.tsx"),
    route("labs/:labId", "routes/courses.$courseId.labs.$labId._index.tsx"),
    route("labs/:labId/comparison", "routes/courses.$courseId.labs.$labId.comparison.tsx"),
    route("labs/:labId/edit", "routes/courses.$courseId.labs.$labId.edit.tsx"),
    route("labs/:labId/dashboard", "routes/courses.$courseId.labs.$labId.dashboard.tsx"),
    route("labs/:labId/extensions", "routes/courses.$courseId.labs.$labId.extensions.tsx"),
    route("labs/:labId/hand-ins/:dropLogId", "routes/courses.$courseId.labs.$labId.hand-ins.$dropLogId.tsx"),
    route("labs/:labId/marking", "routes/courses.$courseId.labs.$labId.marking.tsx"),
    route("labs/:labId/rubric", "routes/courses.$courseId.labs.$labId.rubric.tsx"),
    route("labs/:labId/moderation", "routes/courses.$courseId.labs.$labId.moderation.tsx"),
  ]),
  // Outside the frame: a printable page and file downloads.
  route("courses/:courseId/kits/:kitId/packing-slip", "routes/courses.$courseId.kits.$kitId.packing-slip.tsx"),
  route("courses/:courseId/kits/tracking-template.csv", "routes/courses.$courseId.kits.tracking-template[.]csv.ts"),
  route("courses/:courseId/shipments/:shipmentId/print.pdf", "routes/courses.$courseId.shipments.$shipmentId.print[.]pdf.ts"),
  route("courses/:courseId/roster-template.csv", "routes/courses.$courseId.roster-template[.]csv.ts"),
  route("courses/:courseId/parts/template.csv", "routes/courses.$courseId.parts.template[.]csv.ts"),
  route("courses/:courseId/inventory.csv", "routes/courses.$courseId.inventory[.]csv.ts"),
  route("courses/:courseId/my-address.json", "routes/courses.$courseId.my-address[.]json.ts"),
  route("courses/:courseId/addresses/template.csv", "routes/courses.$courseId.addresses.template[.]csv.ts"),
  route("courses/:courseId/labs/:labId/photos", "routes/courses.$courseId.labs.$labId.photos.ts"),
  route("courses/:courseId/labs/:labId/comparison.csv", "routes/courses.$courseId.labs.$labId.comparison[.]csv.ts"),
  route("courses/:courseId/labs/:labId/marks.csv", "routes/courses.$courseId.labs.$labId.marks[.]csv.ts"),
  route("courses/:courseId/photos/:photoId", "routes/courses.$courseId.photos.$photoId.ts"),
  // A user's private calendar feed: the token is the key, no session needed.
  route("calendar/:token.ics", "routes/calendar.$token[.]ics.ts"),
  route("api/v1/me", "routes/api/v1.me.ts"),
  route("api/v1/reduce", "routes/api/v1.reduce.ts"),
  route("api/v1/courses/:courseId/labs", "routes/api/v1.courses.$courseId.labs.ts"),
  // Under one lab: its middleware resolves the lab and the caller's access to its course once.
  route("api/v1/labs/:labId", "routes/api/v1.labs.$labId.ts", [
    route("class-comparison", "routes/api/v1.labs.$labId.class-comparison.ts"),
    route("marks", "routes/api/v1.labs.$labId.marks.ts"),
    route("drop-logs", "routes/api/v1.labs.$labId.drop-logs.ts"),
    route("drop-logs/:dropLogId", "routes/api/v1.labs.$labId.drop-logs.$dropLogId.ts"),
  ]),
  route("api/v1/openapi.json", "routes/api/v1.openapi[.]json.ts"),
  ...(demoBuild ? [route("dev/inbox", "routes/dev.inbox.tsx"), route("api/dev/emails", "routes/api/dev.emails.ts")] : []),
  // Before the site's catch-all: an unknown API address answers JSON, not the 404 page.
  route("api/*", "routes/api/not-found.ts"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
