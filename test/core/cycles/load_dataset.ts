/**
 * Test helper: read one of the R dataset exports in fixtures/datasets (see PROVENANCE.md there).
 */
export function loadDataset(name: string): { date: string[]; time: number[]; value: number[] } {
  const url = new URL(`../../../fixtures/datasets/${name}.csv`, import.meta.url);
  const lines = Deno.readTextFileSync(url).split("\n").filter((l) => l && !l.startsWith("#"));
  const head = lines[0].split(",");
  const iDate = head.indexOf("date"), iT = head.indexOf("decimal_year"), iV = head.indexOf("value");
  const rows = lines.slice(1).map((l) => l.split(","));
  return {
    date: rows.map((r) => r[iDate]),
    time: rows.map((r) => Number(r[iT])),
    value: rows.map((r) => Number(r[iV])),
  };
}
