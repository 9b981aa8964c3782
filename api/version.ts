/**
 * Service version (from deno.json) and per-kind algorithm versions.
 *
 * @module
 */
import denoJson from "../deno.json" with { type: "json" };

export const SERVICE_VERSION: string = denoJson.version;
