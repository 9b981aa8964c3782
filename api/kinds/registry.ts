export { RUN_KINDS } from "../analyses/registry.ts";
