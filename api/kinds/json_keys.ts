/**
 * Moved to `api/analyses/common/keys.ts` (the key-spelling policy of results); this module
 * re-exports it until the kinds that import it from here move into their analysis folders.
 *
 * @module
 */
export { camelKeys, camelName, snakeKeys, snakeName } from "../analyses/common/keys.ts";
