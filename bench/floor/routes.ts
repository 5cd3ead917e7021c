import { type RouteConfig, route } from "@react-router/dev/routes";

export default [route("page", "routes/page.tsx"), route("echo", "routes/echo.ts")] satisfies RouteConfig;
