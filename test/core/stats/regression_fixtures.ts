/** Shared loaders for the regression reference fixtures (test helper). */
import rRef from "../../../fixtures/reference/regression_r.json" with { type: "json" };
import smRef from "../../../fixtures/reference/regression_statsmodels.json" with {
  type: "json",
};

export { rRef, smRef };

/** R's longley data exported to fixtures/datasets/longley.csv (see its PROVENANCE.md). */
export function readLongley(): { names: string[]; x: Float64Array[]; employed: Float64Array } {
  const text = Deno.readTextFileSync(
    new URL("../../../fixtures/datasets/longley.csv", import.meta.url),
  );
  const rows = text.split("\n").filter((l) => l.trim() !== "" && !l.startsWith("#"));
  const head = rows[0].split(",");
  const data = rows.slice(1).map((l) => l.split(",").map(Number));
  const names = ["GNP.deflator", "GNP", "Unemployed", "Armed.Forces", "Population", "Year"];
  const col = (h: string) => Float64Array.from(data.map((r) => r[head.indexOf(h)]));
  return { names, x: names.map(col), employed: col("Employed") };
}

/** The constructed proxy-regression case of fixtures/reference/regression_r.R. */
export function proxyCase(): { facular: Float64Array; spsi: Float64Array; tsi: Float64Array } {
  const d = rRef.proxy.data;
  return {
    facular: Float64Array.from(d.facular),
    spsi: Float64Array.from(d.spsi),
    tsi: Float64Array.from(d.tsi),
  };
}

/** |a − b| ≤ rel·|b| (+ abs) for every element. */
export function assertClose(
  actual: ArrayLike<number>,
  expected: ArrayLike<number>,
  rel: number,
  what: string,
  abs = 0,
): void {
  if (actual.length !== expected.length) {
    throw new Error(`${what}: length ${actual.length} vs ${expected.length}`);
  }
  for (let i = 0; i < actual.length; i++) {
    const d = Math.abs(actual[i] - expected[i]);
    if (!(d <= rel * Math.abs(expected[i]) + abs)) {
      throw new Error(`${what}[${i}]: got ${actual[i]}, expected ${expected[i]} (diff ${d})`);
    }
  }
}
