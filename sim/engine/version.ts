/** Recorded with every result; bump when a change alters numbers for the same spec and seed. */
export const ENGINE_VERSION = "linger-engine 1.0.0";
