/** `npm run seed`: migrate the development database and add the demo scenario if it is missing. */
import { prepareDevelopmentDatabase } from "./seed-demo";

console.log(`Demo scenario: ${await prepareDevelopmentDatabase()}.`);
