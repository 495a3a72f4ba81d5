/** Trialbook's version, reported by the CLI and in `analyze --format json`. Keep equal to package.json. */
export const VERSION = "0.1.0";
