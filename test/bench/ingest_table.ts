/**
 * The benchmark table of the ingestion benchmarks: a 150,000-row daily CSV (about 411 years
 * of days from 1700-01-01, since pandas timestamps start in 1677) with a value and a
 * one-sigma column computed from a formula. Same table as test/bench/ingest_numpy.py.
 *
 * @module
 */

/** Rows of the benchmark table. */
export const ROWS = 150_000;

/** The table as CSV text: `date,value,sigma`. */
export function dailyCsv(rows = ROWS): string {
  const out = ["date,value,sigma"];
  const t0 = Date.UTC(1700, 0, 1);
  for (let i = 0; i < rows; i++) {
    const d = new Date(t0 + i * 86_400_000).toISOString().slice(0, 10);
    const v = 1360.5 + 0.5 * Math.sin((2 * Math.PI * i) / 4018) + 0.1 * Math.sin(i * 0.37);
    out.push(`${d},${v.toFixed(4)},0.05`);
  }
  return out.join("\n") + "\n";
}
