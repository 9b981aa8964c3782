/**
 * Uploads as researchers export them: R's time() of a ts (start of each period), and absolute
 * temperatures in degrees Celsius or Fahrenheit.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "./helpers.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";

const DATASETS = new URL("../../fixtures/datasets/", import.meta.url);

async function uploadText(svc: TestService, file: string, query: Record<string, string>) {
  const res = await svc.app.request(`/v1/series?${new URLSearchParams(query)}`, {
    method: "POST",
    headers: { "content-type": "text/csv" },
    body: Deno.readTextFileSync(new URL(file, DATASETS)),
  });
  return { status: res.status, body: await res.json() };
}

const SUNSPOTS = { name: "R sunspot.month", quantity: "sunspot_number", units: "1", version: "1" };

Deno.test("POST /v1/series: R's time() export of sunspot.month is a monthly grid", async () => {
  const svc = await makeTestApp();
  try {
    // fixtures/datasets/export_r_time.R: write.csv(data.frame(time = time(x), ...)), R 4.2.2
    const up = await uploadText(svc, "sunspot_month_r_time.csv", SUNSPOTS);
    assert.equal(up.status, 201, JSON.stringify(up.body));
    assert.equal(up.body.series.resolution, "monthly");
    assert.equal(up.body.series.start_date, "1749-01");
    assert.equal(up.body.series.end_date, "2013-09");
    const grid = up.body.report.time_grid;
    assert.deepEqual(
      [grid.resolution, grid.position, grid.months, grid.moved_to_middle],
      ["monthly", "start", "twelfths", true],
    );
    assert.match(grid.note, /start of each month in twelfths of a year/);
    assert.match(grid.note, /R's time\(\)/);
    // the same months written as ISO 8601 (fixtures/datasets/sunspot_month.csv) are the same
    // series: identical times, so the same content id
    const iso = await uploadText(svc, "sunspot_month.csv", { ...SUNSPOTS, time: "date" });
    assert.equal(iso.status, 200, JSON.stringify(iso.body));
    assert.equal(iso.body.series.id, up.body.series.id);
    assert.equal(iso.body.report.time_grid.position, "middle");
    assert.equal(iso.body.report.time_grid.moved_to_middle, false);
    // a cycle analysis runs on it (before, the series was irregular and this was a 422)
    const cycles = await svc.post("/v1/cycles", { series: up.body.series.id });
    assert.equal(cycles.status, 201, (await cycles.clone().text()).slice(0, 300));
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/series: R's time() export of sunspot.year read as decimal years", async () => {
  const svc = await makeTestApp();
  try {
    const q = { ...SUNSPOTS, name: "R sunspot.year", time_format: "decimal_year" };
    const up = await uploadText(svc, "sunspot_year_r_time.csv", q);
    assert.equal(up.status, 201, JSON.stringify(up.body));
    assert.equal(up.body.series.resolution, "annual");
    assert.equal(up.body.series.start, 1700.5);
    assert.deepEqual(
      [up.body.report.time_grid.position, up.body.report.time_grid.moved_to_middle],
      ["start", true],
    );
    // written as 4-digit integers, R's years are read as ISO years by default: same series
    const auto = await uploadText(svc, "sunspot_year_r_time.csv", { ...q, time_format: "auto" });
    assert.equal(auto.body.series.id, up.body.series.id);
    assert.equal(auto.body.report.time_format, "iso");
    const saved = await (await svc.get(`/v1/series/${up.body.series.id}`)).json();
    assert.deepEqual(saved.time, loadDataset("sunspot_year").time);
  } finally {
    await svc.close();
  }
});

// scipy 1.10.1 scipy.constants.convert_temperature (fixtures/reference/temperature_units_scipy.py)
const SCIPY = JSON.parse(
  Deno.readTextFileSync(
    new URL("../../fixtures/reference/temperature_units_scipy.json", import.meta.url),
  ),
);

Deno.test("POST /v1/series: absolute temperatures in °F and °C are converted to K", async (t) => {
  const svc = await makeTestApp();
  try {
    await t.step("R's nhtemp in degF agrees with scipy's conversion", async () => {
      // R datasets::nhtemp: mean annual temperature in degrees Fahrenheit (fixtures/datasets)
      const up = await uploadText(svc, "nhtemp.csv", {
        name: "R nhtemp",
        quantity: "temperature",
        units: "degF",
        time: "date",
      });
      assert.equal(up.status, 201, JSON.stringify(up.body));
      assert.equal(up.body.series.units, "K");
      assert.deepEqual(up.body.report.units_conversion, {
        from: "degF",
        to: "K",
        formula: "K = (degF − 32) × 5/9 + 273.15",
      });
      assert.match(up.body.series.description, /converted on upload from degF to K/);
      const s = await (await svc.get(`/v1/series/${up.body.series.id}`)).json();
      assert.equal(s.value.length, SCIPY.nhtemp_K.length);
      s.value.forEach((v: number, i: number) => {
        assert.ok(Math.abs(v - SCIPY.nhtemp_K[i]) < 1e-9, `${i}: ${v} vs ${SCIPY.nhtemp_K[i]}`);
      });
      // the CSV export carries the conversion in its description line
      const csv = await (await svc.get(`/v1/series/${up.body.series.id}`, {
        accept: "text/csv",
      })).text();
      assert.match(csv, /converted on upload from degF to K/);
    });
    await t.step("every usual spelling of °C and °F", async () => {
      const cases: [string, number[], number[]][] = [];
      for (const u of ["degC", "°C", "Celsius", "celsius", "degree_Celsius", "deg_C", "C"]) {
        cases.push([u, SCIPY.celsius, SCIPY.celsius_K]);
      }
      for (const u of ["degF", "°F", "F", "Fahrenheit", "degrees_Fahrenheit", "degreeF"]) {
        cases.push([u, SCIPY.fahrenheit, SCIPY.fahrenheit_K]);
      }
      for (const [units, given, kelvin] of cases) {
        const res = await svc.post("/v1/series", {
          name: `fixed points in ${units}`,
          quantity: "temperature",
          units,
          time: given.map((_, i) => 2000 + i),
          value: given,
        });
        const body = await res.json();
        assert.ok(res.status === 201 || res.status === 200, `${units}: ${JSON.stringify(body)}`);
        assert.equal(body.series.units, "K");
        assert.equal(body.report.units_conversion.from, units);
        const s = await (await svc.get(`/v1/series/${body.series.id}`)).json();
        s.value.forEach((v: number, i: number) => assert.ok(Math.abs(v - kelvin[i]) < 1e-9));
      }
    });
    await t.step("anomalies: a degC difference is a K difference, a degF one ×5/9", async () => {
      const base = { quantity: "temperature_anomaly", time: ["2001", "2002"], value: [9, -4.5] };
      const f = await (await svc.post("/v1/series", { ...base, name: "F", units: "°F" })).json();
      assert.equal(f.series.units, "K");
      const fs = await (await svc.get(`/v1/series/${f.series.id}`)).json();
      // scipy: (59 °F − 50 °F) in K = 5
      assert.ok(Math.abs(fs.value[0] - SCIPY.difference_9_degF_K) < 1e-12);
      assert.ok(Math.abs(fs.value[1] + 2.5) < 1e-12);
      const c = await (await svc.post("/v1/series", { ...base, name: "C", units: "degC" })).json();
      const cs = await (await svc.get(`/v1/series/${c.series.id}`)).json();
      assert.deepEqual(cs.value, [9, -4.5]);
      assert.match(c.report.units_conversion.formula, /1 degC is 1 K/);
    });
    await t.step("uncertainties scale without the offset", async () => {
      const res = await svc.post("/v1/series", {
        name: "with sigma",
        quantity: "temperature",
        units: "degF",
        time: ["2001", "2002"],
        value: [50, 59],
        uncertainty: [0.9, 1.8],
      });
      const s = await (await svc.get(`/v1/series/${(await res.json()).series.id}`)).json();
      assert.ok(Math.abs(s.uncertainty[0] - 0.5) < 1e-12 && Math.abs(s.uncertainty[1] - 1) < 1e-12);
    });
    await t.step(
      "other units for a temperature are refused, naming the accepted ones",
      async () => {
        const res = await svc.post("/v1/series", {
          name: "bad",
          quantity: "temperature",
          units: "W m-2",
          time: ["2001", "2002"],
          value: [1, 2],
        });
        const body = await assertProblem(res, 422);
        assert.equal(body.errors[0].pointer, "/units");
        assert.match(body.errors[0].message, /degC, °C, degF, °F/);
      },
    );
  } finally {
    await svc.close();
  }
});
