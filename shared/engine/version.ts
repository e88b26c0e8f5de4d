/**
 * Version of the statistics engine. Stored with every revision's results; a change of any
 * method's numbers, of the result shape or of a display rule bumps it, so that re-evaluating an old
 * revision reports engine drift instead of silently rewriting its results.
 */
export const ENGINE_VERSION = '1.1.0';
