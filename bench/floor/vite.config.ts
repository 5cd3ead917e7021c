import { reactRouter } from "@react-router/dev/vite";
import { defineConfig } from "vite";

// Only React Router's plugin: the floor has no styles and no path aliases.
export default defineConfig({ plugins: [reactRouter()] });
