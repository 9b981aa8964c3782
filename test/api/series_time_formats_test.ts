import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";

async function uploadText(
  svc: Awaited<ReturnType<typeof makeTestApp>>,
  text: string,
  query: string,
  type = "text/csv",
) {
  const res = await svc.app.request(`/v1/series?${query}`, {
    method: "POST",
    headers: { "content-type": type },
    body: text,
  });
  const body = await res.json();
  assert.ok(res.status === 201 || res.status === 200, JSON.stringify(body));
  const s = await (await svc.get(`/v1/series/${body.series.id}`)).json();
  return { upload: body, series: s };
}

const Q = "name=probe&quantity=other&units=1";

Deno.test("POST /v1/series reads every time format into hand-computed decimal years", async (t) => {
  const svc = await makeTestApp();
  await t.step("YYYY: middle of the year", async () => {
    const { series } = await uploadText(svc, "year,value\n1900,1\n2000,2\n", Q);
    assert.deepEqual(series.time, [1900.5, 2000.5]);
    assert.equal(series.resolution, "annual");
    assert.deepEqual(series.date, ["1900", "2000"]);
  });
  await t.step("YYYY-MM: middle of the month (February 1900: 28 days, 2000: 29)", async () => {
    const { series } = await uploadText(svc, "date;value\n1900-02;1\n2000-02;2\n", Q);
    // 1900-02: 31 days of January + 14 days = 45 of 365; 2000-02: 31 + 14.5 = 45.5 of 366
    assert.deepEqual(series.time, [1900 + 45 / 365, 2000 + 45.5 / 366]);
    assert.deepEqual(series.date, ["1900-02", "2000-02"]);
  });
  await t.step("YYYY-MM-DD: noon; 2023-03-01 and 2024-03-01", async () => {
    const { series } = await uploadText(svc, "date\tvalue\n2023-03-01\t1\n2024-03-01\t2\n", Q);
    // 2023-03-01: day 60 of 365 → (59 + 0.5) / 365; 2024-03-01: day 61 of 366 → (60 + 0.5) / 366
    assert.deepEqual(series.time, [2023 + 59.5 / 365, 2024 + 60.5 / 366]);
    assert.deepEqual(series.date, ["2023-03-01", "2024-03-01"]);
  });
  await t.step("date-times with Z and offsets", async () => {
    const { series } = await uploadText(
      svc,
      "time value\n2024-01-01T00:00:00Z 1\n2024-01-01T18:00:00+06:00 2\n2024-01-02T00:00Z 3\n",
      Q,
    );
    // 18:00+06:00 is 12:00 UTC: half a day of 366
    assert.deepEqual(series.time, [2024, 2024 + 0.5 / 366, 2024 + 1 / 366]);
    assert.equal(series.resolution, "irregular");
    assert.equal(series.date[1], "2024-01-01T12:00:00Z");
  });
  await t.step("decimal years", async () => {
    const { series } = await uploadText(svc, "decimal_year,value\n1996.0,1\n1996.25,2\n", Q);
    assert.deepEqual(series.time, [1996, 1996.25]);
  });
  await t.step("year / month / day columns", async () => {
    const { series, upload } = await uploadText(
      svc,
      "y,m,d,v\n2000,2,28,1\n2000,2,29,2\n2000,3,1,3\n",
      `${Q}&year=y&month=m&day=d&value=v`,
    );
    assert.deepEqual(series.time, [2000 + 58.5 / 366, 2000 + 59.5 / 366, 2000 + 60.5 / 366]);
    assert.equal(upload.report.time_format, "year_month_day");
  });
  await t.step("a sunlag CSV export re-uploads without any query", async () => {
    const { series } = await uploadText(svc, "date;value\n1900-02;1\n2000-02;2\n", Q);
    const csv = await (await svc.get(`/v1/series/${series.id}?format=csv`)).text();
    const again = await svc.app.request("/v1/series", {
      method: "POST",
      headers: { "content-type": "text/csv" },
      body: csv,
    });
    assert.equal(again.status, 200);
    assert.equal((await again.json()).series.id, series.id);
  });
  await svc.close();
});
