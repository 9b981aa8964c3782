/**
 * Defensive readers for stored run results: a chart must never crash on a field it does not
 * know or on a shape that changed, so every access checks the type and answers null when it
 * does not fit.
 *
 * @module
 */
import type { OutputSeries } from "../runs/kind.ts";

export type Obj = Record<string, unknown>;

export function obj(v: unknown): Obj | null {
  return v !== null && typeof v === "object" && !Array.isArray(v) ? v as Obj : null;
}

export function numOrNull(v: unknown): number | null {
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

export function str(v: unknown): string | null {
  return typeof v === "string" ? v : null;
}

/** An array of numbers (null kept for gaps), or null when it is not one. */
export function numbers(v: unknown): (number | null)[] | null {
  if (!Array.isArray(v)) return null;
  const out: (number | null)[] = new Array(v.length);
  for (let i = 0; i < v.length; i++) {
    const x = v[i];
    if (x === null) out[i] = null;
    else if (typeof x === "number" && Number.isFinite(x)) out[i] = x;
    else return null;
  }
  return out;
}

/** An array of finite numbers (no gaps), or null. */
export function strictNumbers(v: unknown): number[] | null {
  const a = numbers(v);
  return a && a.every((x) => x !== null) ? a as number[] : null;
}

/** Array of objects, or null. */
export function objects(v: unknown): Obj[] | null {
  return Array.isArray(v) && v.every((x) => obj(x) !== null) ? v as Obj[] : null;
}

/** A series-like output checked field by field, or null when it does not fit the contract. */
export function outputSeries(v: unknown, fallbackName = "output"): OutputSeries | null {
  const o = obj(v);
  if (!o) return null;
  const time = strictNumbers(o.time);
  const value = numbers(o.value);
  if (!time || !value || time.length !== value.length) return null;
  const opt = (k: string) => {
    const a = numbers(o[k]);
    return a && a.length === time.length ? a : undefined;
  };
  return {
    name: str(o.name) ?? fallbackName,
    quantity: str(o.quantity) ?? "other",
    units: str(o.units) ?? "",
    time,
    value,
    uncertainty: opt("uncertainty"),
    lower: opt("lower"),
    upper: opt("upper"),
    interval: str(o.interval) ?? undefined,
    description: str(o.description) ?? undefined,
  };
}

/** Every valid output of a result, by name, in stored order. */
export function outputsOf(result: unknown): [string, OutputSeries][] {
  const outs = obj(obj(result)?.outputs);
  if (!outs) return [];
  const list: [string, OutputSeries][] = [];
  for (const [k, v] of Object.entries(outs)) {
    const o = outputSeries(v, k);
    if (o) list.push([k, o]);
  }
  return list;
}

/** Strings of an array field (e.g. cautions), ignoring anything else. */
export function strings(v: unknown): string[] {
  return Array.isArray(v) ? v.filter((x): x is string => typeof x === "string") : [];
}
