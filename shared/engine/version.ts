/**
 * Version of the harmonic-channel engine. Bump the minor version when a result can change for the
 * same request (cached evaluations keyed on it must be discarded), the patch version otherwise.
 */
export const ENGINE_VERSION = '1.1.0'
