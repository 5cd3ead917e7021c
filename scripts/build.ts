/**
 * `npm run build`: the production build in build/, without the development inbox and without demo
 * data. `--demo` (`npm run build:demo`) builds what `npm start` and `npm test` serve.
 */
import { buildApp } from "./lib/build";

await buildApp({ demo: process.argv.includes("--demo") });
