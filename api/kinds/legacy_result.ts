/**
 * The loose result schema of a run kind not yet moved into its `api/analyses/<kind>/` folder.
 * A test lists which kinds still use it; the list must end empty.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

export const LegacyResult = z.record(z.string(), z.unknown());
