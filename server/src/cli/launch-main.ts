// The `trialbook` bin (dist/cli.cjs): starts the CLI bundle through its code cache (launcher.ts).
import { launch } from "./launcher.js";

launch(__dirname, process.env);
