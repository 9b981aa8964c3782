/**
 * Coastlines for map charts: the Natural Earth 1:110m land polygons (version 4.1.0) as
 * redistributed in TopoJSON by the npm package `world-atlas` 2.0.2 (ISC), decoded with
 * `topojson-client` 3.1.0 (ISC). Natural Earth's terms of use put its vector data in the public
 * domain (naturalearthdata.com, "Terms of use"), so the outlines can be drawn into every chart
 * without a licence notice.
 *
 * The outlines are decoded once, then projected per chart onto an equirectangular frame
 * (x linear in longitude, y linear in latitude) whose longitude window may start anywhere
 * (e.g. 0..360 for a field on 0–360° longitudes): each ring is drawn once per 360° shift that
 * overlaps the window, and the caller clips to the frame.
 *
 * @module
 */
import land from "world-atlas/land-110m.json" with { type: "json" };
import { feature } from "topojson-client";
import type { GeometryObject, Topology } from "topojson-specification";

/** Rings of the land polygons, [lon, lat] pairs in degrees, with each ring's longitude span. */
interface Ring {
  points: Float64Array;
  west: number;
  east: number;
}

let rings: Ring[] | null = null;

function landRings(): Ring[] {
  if (rings) return rings;
  const topo = land as unknown as Topology<{ land: GeometryObject }>;
  const fc = feature(topo, topo.objects.land) as unknown as {
    features: { geometry: { type: string; coordinates: number[][][] | number[][][][] } }[];
  };
  const out: Ring[] = [];
  for (const f of fc.features) {
    const g = f.geometry;
    const polys = g.type === "Polygon"
      ? [g.coordinates as number[][][]]
      : (g.coordinates as number[][][][]);
    for (const poly of polys) {
      for (const ring of poly) {
        const pts = new Float64Array(ring.length * 2);
        let west = Infinity, east = -Infinity;
        ring.forEach(([lo, la], k) => {
          pts[2 * k] = lo;
          pts[2 * k + 1] = la;
          west = Math.min(west, lo);
          east = Math.max(east, lo);
        });
        out.push({ points: pts, west, east });
      }
    }
  }
  rings = out;
  return out;
}

/** An equirectangular frame: the longitude and latitude window and the pixel box. */
export interface MapFrame {
  west: number;
  east: number;
  south: number;
  north: number;
  x0: number;
  y0: number;
  width: number;
  height: number;
}

/** Pixel x of a longitude (already shifted into the window). */
export function frameX(f: MapFrame, lon: number): number {
  return f.x0 + ((lon - f.west) / (f.east - f.west)) * f.width;
}

/** Pixel y of a latitude. */
export function frameY(f: MapFrame, lat: number): number {
  return f.y0 + ((f.north - lat) / (f.north - f.south)) * f.height;
}

const r1 = (v: number) => Math.round(v * 10) / 10;

/**
 * The SVG path data of the land outlines in a frame (to be clipped to the frame by the
 * caller). Rings entirely outside the window are skipped.
 *
 * @param f the frame
 * @returns path data ("M…L…Z" per ring and shift)
 * @example
 * ```ts
 * import { coastlinePath } from "./map_coastlines.ts";
 * import assert from "node:assert/strict";
 * const d = coastlinePath({ west: -180, east: 180, south: -90, north: 90, x0: 0, y0: 0, width: 360, height: 180 });
 * assert.ok(d.startsWith("M") && d.length > 10000);
 * ```
 */
export function coastlinePath(f: MapFrame): string {
  let d = "";
  for (const ring of landRings()) {
    for (const shift of [-360, 0, 360]) {
      if (ring.east + shift < f.west || ring.west + shift > f.east) continue;
      const p = ring.points;
      let broken = false;
      for (let k = 0; k < p.length; k += 2) {
        // a step of more than 180° in longitude runs along the date line's cut: lift the pen
        const jump = k > 0 && Math.abs(p[k] - p[k - 2]) > 180;
        if (jump) broken = true;
        d += (k === 0 || jump ? "M" : "L") + r1(frameX(f, p[k] + shift)) + " " +
          r1(frameY(f, p[k + 1]));
      }
      if (!broken) d += "Z";
    }
  }
  return d;
}
