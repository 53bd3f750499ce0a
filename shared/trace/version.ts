/** Bump when a change to parsing or analysis can change a stored result. */
export const ENGINE_VERSION = '1.13.0';
