/** Types of shutdown-grace.mjs (plain JavaScript so that the production worker runs on plain Node). */
export declare const SHUTDOWN_GRACE_MS: number;
