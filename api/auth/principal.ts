/**
 * Who is calling: the principal every request carries after authentication, and what it may
 * do. Roles are ordered reader < writer < admin; an anonymous caller (no key, on an instance
 * that requires keys) has no role and sees only public items.
 *
 * @module
 */
import type { HolderSpec, Role, Viewer, Visibility } from "../store/types.ts";
import { LOCAL_OWNER } from "../store/types.ts";

/** The caller of one request. */
export interface Principal {
  /** Owner id; null for an anonymous caller. */
  owner: string | null;
  /** The owner's group (items shared with "group" are seen by its members). */
  group: string | null;
  /** Effective role (the owner's, narrowed by the key's); null when anonymous. */
  role: Role | null;
  /** How the caller was recognised. */
  via: "local" | "admin-key" | "api-key" | "anonymous";
  /** The API key used, if any. */
  keyId: string | null;
}

/** Rank of each role; a caller may do what its rank or a lower one allows. */
export const ROLE_RANK: Record<Role, number> = { reader: 1, writer: 2, admin: 3 };

/** The narrower of two roles. */
export function narrower(a: Role, b: Role | null): Role {
  return b !== null && ROLE_RANK[b] < ROLE_RANK[a] ? b : a;
}

/** The single-user tool's caller: the built-in local owner, an admin. */
export const LOCAL_PRINCIPAL: Principal = {
  owner: LOCAL_OWNER,
  group: "default",
  role: "admin",
  via: "local",
  keyId: null,
};

/** A caller without a key on an instance that requires keys. */
export const ANONYMOUS: Principal = {
  owner: null,
  group: null,
  role: null,
  via: "anonymous",
  keyId: null,
};

/** True when the principal's role is at least `role`. */
export function hasRole(p: Principal, role: Role): boolean {
  return p.role !== null && ROLE_RANK[p.role] >= ROLE_RANK[role];
}

/** The store's view of a principal. */
export function viewerOf(p: Principal): Viewer {
  return { owner: p.owner, group: p.group, admin: p.role === "admin" };
}

/** The holder a principal's writes are recorded under. */
export function holderOf(p: Principal, visibility: Visibility = "private"): HolderSpec {
  if (p.owner === null) throw new Error("holderOf: an anonymous caller holds nothing");
  return { owner: p.owner, visibility };
}

/** True when quotas and the request rate apply (every caller but admins). */
export function isLimited(p: Principal): boolean {
  return p.role !== "admin";
}
