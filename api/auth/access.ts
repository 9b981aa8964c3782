/**
 * Object-level authorisation: every route that reads or changes one series or run asks here
 * first. An item the caller may not see answers exactly like one that does not exist (404),
 * so ids of others' private items cannot be probed; changing an item the caller sees but does
 * not hold (delete, cancel, share) is 403.
 *
 * @module
 */
import type { Holding, HoldingRef, Store, Viewer } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { type Principal, viewerOf } from "./principal.ts";

/** The holding through which the caller sees the series; 404 when it sees none. */
export async function mustSeeSeries(store: Store, p: Principal, id: string): Promise<Holding> {
  const h = await store.seriesHolding(id, viewerOf(p));
  if (!h) throw new ProblemError("not-found", `No series has id ${id}`);
  return h;
}

/**
 * The holdings through which `viewer` sees several items, in order (null where it sees none):
 * one access check where the store answers several at once, else one per item.
 */
export function holdingsOf(
  store: Store,
  items: readonly HoldingRef[],
  viewer: Viewer,
): Promise<(Holding | null)[]> {
  if (store.holdings) return store.holdings(items, viewer);
  return Promise.all(
    items.map((it) =>
      it.kind === "run" ? store.runHolding(it.id, viewer) : store.seriesHolding(it.id, viewer)
    ),
  );
}

/**
 * {@link holdingsOf}, answered at once where the store can (`Store.holdingsNow`), else as a
 * promise. For the fast path of cached GETs (api/hot_gets.ts), where a promise costs more than
 * an embedded store's answer.
 */
export function holdingsNowOf(
  store: Store,
  items: readonly HoldingRef[],
  viewer: Viewer,
): (Holding | null)[] | Promise<(Holding | null)[]> {
  return store.holdingsNow ? store.holdingsNow(items, viewer) : holdingsOf(store, items, viewer);
}

/** The holding through which the caller sees the run; 404 when it sees none. */
export async function mustSeeRun(store: Store, p: Principal, id: string): Promise<Holding> {
  const h = await store.runHolding(id, viewerOf(p));
  if (!h) throw new ProblemError("not-found", `No run has id ${id}`);
  return h;
}

/**
 * The caller's own holding of a run (admins: any holding); 404 when it cannot see the run,
 * 403 when it sees but does not hold it.
 */
export async function mustHoldRun(
  store: Store,
  p: Principal,
  id: string,
  action: string,
): Promise<Holding> {
  return mustHold(await mustSeeRun(store, p, id), p, `Run ${id}`, action);
}

/** As {@link mustHoldRun}, for a series. */
/** The holding through which the caller sees field `id`, or a 404 problem. */
export async function mustSeeField(store: Store, p: Principal, id: string): Promise<Holding> {
  const h = await store.fieldHolding(id, viewerOf(p));
  if (!h) throw new ProblemError("not-found", `No field has id ${id}`);
  return h;
}

/** The caller's own holding of field `id` (admins may act on any), or a 403/404 problem. */
export async function mustHoldField(
  store: Store,
  p: Principal,
  id: string,
  action: string,
): Promise<Holding> {
  return mustHold(await mustSeeField(store, p, id), p, `Field ${id}`, action);
}

export async function mustHoldSeries(
  store: Store,
  p: Principal,
  id: string,
  action: string,
): Promise<Holding> {
  return mustHold(await mustSeeSeries(store, p, id), p, `Series ${id}`, action);
}

function mustHold(h: Holding, p: Principal, what: string, action: string): Holding {
  if (h.owner !== p.owner && p.role !== "admin") {
    throw new ProblemError(
      "forbidden",
      `${what} is shared with you by its owner; only its owner or an admin may ${action} it`,
    );
  }
  return h;
}

/**
 * Whether a representation of an item may be kept by shared caches: when it is public, or
 * when the instance requires no keys (the single-user tool, where everything reachable is
 * everyone's who reaches it).
 */
export function sharedCacheable(p: Principal, h: Holding): boolean {
  return h.visibility === "public" || p.via === "local";
}
