/**
 * NetCDF over HTTP: series and run outputs as NetCDF-CF on each calendar (byte-stable, cached,
 * refused where the calendar cannot hold the series), NetCDF uploads of series (NetCDF-3 and
 * NetCDF-4 files that Debian's netCDF4 wrote, and files sunlag wrote, read back), and every kind
 * of bad input as an RFC 9457 problem with nothing stored.
 */
import assert from "node:assert/strict";
import { NetCDFReader } from "netcdfjs";
import {
  assertProblem,
  makeTestApp,
  monthlySeries,
  type TestService,
  uploadSeries,
} from "../helpers.ts";
import { putFinishedRun } from "../run_fixture.ts";
import { stopNetcdf4Worker } from "../../../api/netcdf/netcdf4_source.ts";
import { encodeNetcdf3, ncText } from "../../../core/cf/mod.ts";
import { cfDateFromDayNumber, cfDayNumber, decimalYear } from "../../../core/time/mod.ts";

const DIR = new URL("../../../fixtures/netcdf/", import.meta.url);
const fixture = (f: string) => Deno.readFile(new URL(f, DIR));

function postNetcdf(svc: TestService, query: string, body: Uint8Array) {
  return Promise.resolve(svc.app.request(`/v1/series?${query}`, {
    method: "POST",
    headers: { "content-type": "application/x-netcdf" },
    body: body as Uint8Array<ArrayBuffer>,
  }));
}

async function seriesCount(svc: TestService): Promise<number> {
  return (await (await svc.get("/v1/series")).json()).total;
}

function numbers(r: NetCDFReader, name: string, n: number): number[] {
  return (r.getDataVariable(name) as number[]).flat().slice(0, n);
}

function attr(r: NetCDFReader, v: string, a: string) {
  return (r.variables.find((x) => x.name === v)?.attributes as { name: string; value: unknown }[])
    .find((x) => x.name === a)?.value;
}

const TSI = () =>
  monthlySeries(
    "TSI (synthetic)",
    "tsi",
    "W m-2",
    1999,
    36,
    (i) => (i === 5 ? null : 1361 + 0.01 * i),
    {
      uncertainty: Array.from({ length: 36 }, (_, i) => 0.1 + 0.001 * i),
    },
  );

Deno.test("GET /v1/series/{id}?format=netcdf on each calendar", async (t) => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, TSI());
    await t.step("standard by default; CF attributes; values, bounds, gaps absent", async () => {
      const res = await svc.get(`/v1/series/${id}?format=netcdf`);
      assert.equal(res.status, 200);
      assert.equal(res.headers.get("content-type"), "application/x-netcdf");
      assert.match(
        res.headers.get("content-disposition") ?? "",
        /^attachment; filename="tsi_[0-9a-f]{12}_standard\.nc"$/,
      );
      const bytes = new Uint8Array(await res.arrayBuffer());
      assert.equal(Number(res.headers.get("content-length")), bytes.length);
      const r = new NetCDFReader(bytes);
      assert.equal(r.getAttribute("Conventions"), "CF-1.10");
      assert.match(String(r.getAttribute("source")), /^sunlag \d/);
      assert.equal(r.getAttribute("series_id"), id);
      assert.equal(attr(r, "time", "calendar"), "standard");
      assert.equal(attr(r, "time", "units"), "days since 1850-01-01 00:00:00");
      assert.equal(attr(r, "tsi", "standard_name"), "solar_irradiance");
      assert.equal(attr(r, "tsi", "cell_methods"), "time: mean");
      assert.equal(attr(r, "tsi", "ancillary_variables"), "tsi_uncertainty");
      // The uploaded null is a gap: 35 points, June 1999 absent.
      const n = r.dimensions.find((d) => d.name === "time")!.size;
      assert.equal(n, 35);
      const b = numbers(r, "time_bnds", 2 * n);
      const start = cfDayNumber("standard", 1850, 1, 1);
      const d0 = cfDateFromDayNumber("standard", start + b[0]);
      assert.deepEqual(d0, { year: 1999, month: 1, day: 1 });
      assert.deepEqual(cfDateFromDayNumber("standard", start + b[9]), {
        year: 1999,
        month: 6,
        day: 1,
      });
      assert.deepEqual(cfDateFromDayNumber("standard", start + b[10]), {
        year: 1999,
        month: 7,
        day: 1,
      });
    });
    await t.step("noleap and 360_day: same months, the target calendar's bounds", async () => {
      for (
        const [cal, feb] of [["noleap", 28], ["360_day", 30], ["all_leap", 29], [
          "365_day",
          28,
        ]] as const
      ) {
        const res = await svc.get(`/v1/series/${id}?format=netcdf&calendar=${cal}`);
        assert.equal(res.status, 200, cal);
        const r = new NetCDFReader(new Uint8Array(await res.arrayBuffer()));
        const b = numbers(r, "time_bnds", 70);
        assert.equal(b[3] - b[2], feb, `${cal}: February 1999`);
        assert.match(String(r.getAttribute("calendar_conversion")), /same month/);
        assert.deepEqual(numbers(r, "tsi", 2), [1361, 1361.01]);
      }
    });
    await t.step("same request, same bytes; ETag and 304", async () => {
      const a = new Uint8Array(
        await (await svc.get(`/v1/series/${id}?format=netcdf&calendar=noleap`)).arrayBuffer(),
      );
      const res = await svc.get(`/v1/series/${id}?format=netcdf&calendar=noleap`);
      assert.deepEqual(new Uint8Array(await res.arrayBuffer()), a);
      const etag = res.headers.get("etag")!;
      assert.match(etag, /noleap/);
      const again = await svc.get(`/v1/series/${id}?format=netcdf&calendar=noleap`, {
        "if-none-match": etag,
      });
      assert.equal(again.status, 304);
      const other = await svc.get(`/v1/series/${id}?format=netcdf&calendar=360_day`);
      assert.notEqual(other.headers.get("etag"), etag);
      await other.body?.cancel();
    });
    await t.step("written once: later answers are the kept file, the series not read", async () => {
      const url = `/v1/series/${id}?format=netcdf&calendar=all_leap`;
      const first = await svc.get(url);
      const bytes = new Uint8Array(await first.arrayBuffer());
      const store = svc.store;
      const getSeries = store.getSeries.bind(store);
      let reads = 0;
      store.getSeries = (sid) => (reads++, getSeries(sid));
      try {
        for (let k = 0; k < 3; k++) {
          const res = await svc.get(url);
          assert.equal(res.status, 200);
          assert.deepEqual(new Uint8Array(await res.arrayBuffer()), bytes);
          for (
            const h of ["content-type", "content-disposition", "etag", "cache-control", "vary"]
          ) {
            assert.equal(res.headers.get(h), first.headers.get(h), h);
          }
        }
        assert.equal(reads, 0);
        // another calendar is another file, written on its first request
        await (await svc.get(`/v1/series/${id}?format=netcdf&calendar=julian`)).arrayBuffer();
        assert.equal(reads, 1);
      } finally {
        store.getSeries = getSeries;
      }
    });
    await t.step("Accept: application/x-netcdf", async () => {
      const res = await svc.get(`/v1/series/${id}`, { accept: "application/x-netcdf" });
      assert.equal(res.headers.get("content-type"), "application/x-netcdf");
      await res.body?.cancel();
    });
    await t.step(
      "an unknown calendar, or a calendar without NetCDF: 422 naming calendar",
      async () => {
        for (
          const q of [
            "format=netcdf&calendar=lunar",
            "format=csv&calendar=noleap",
            "calendar=360_day",
          ]
        ) {
          const p = await assertProblem(await svc.get(`/v1/series/${id}?${q}`), 422);
          assert.equal(p.errors[0].pointer, "/calendar", q);
          assert.equal(p.errors[0].in, "query");
        }
      },
    );
  } finally {
    await svc.close();
  }
});

Deno.test("a daily series on 360_day is refused (422 naming calendar); on noleap 29 February goes", async () => {
  const svc = await makeTestApp();
  try {
    const time: string[] = [], value: number[] = [];
    for (let d = cfDayNumber("proleptic_gregorian", 2000, 2, 20); time.length < 20; d++) {
      const c = cfDateFromDayNumber("proleptic_gregorian", d);
      time.push(`${c.year}-${String(c.month).padStart(2, "0")}-${String(c.day).padStart(2, "0")}`);
      value.push(time.length);
    }
    const id = await uploadSeries(svc, {
      name: "daily (synthetic)",
      quantity: "tsi",
      units: "W m-2",
      time,
      value,
    });
    const p = await assertProblem(
      await svc.get(`/v1/series/${id}?format=netcdf&calendar=360_day`),
      422,
    );
    assert.equal(p.errors[0].pointer, "/calendar");
    assert.equal(p.reason, "not_representable");
    assert.match(p.detail, /360_day/);
    const res = await svc.get(`/v1/series/${id}?format=netcdf&calendar=noleap`);
    const r = new NetCDFReader(new Uint8Array(await res.arrayBuffer()));
    assert.equal(r.dimensions.find((d) => d.name === "time")!.size, 19);
    assert.match(
      String(r.getAttribute("calendar_conversion")),
      /1 value\(s\) on 29 February were dropped/,
    );
    assert.deepEqual(numbers(r, "tsi", 11).slice(8, 11), [9, 11, 12]);
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/runs/{id}/outputs/{name}?format=netcdf carries the run's provenance", async () => {
  const svc = await makeTestApp();
  try {
    const time = Array.from({ length: 12 }, (_, i) => decimalYear(2001, i + 1, 1) + 15 / 365);
    const run = await putFinishedRun(svc.store, "forcing", {
      outputs: {
        forcing: {
          name: "Solar forcing (synthetic)",
          quantity: "radiative_forcing",
          units: "W m-2",
          time: [2001.5, 2002.5, 2003.5],
          value: [0.1, null, 0.12],
          lower: [0.05, null, 0.07],
          upper: [0.15, null, 0.17],
          interval: "95 % interval",
        },
        epoch: {
          name: "composite",
          quantity: "other",
          units: "1",
          time: [-1, 0, 1],
          value: [1, 2, 3],
          time_axis: "years_from_epoch",
        },
        monthly: {
          name: "m",
          quantity: "tsi",
          units: "W m-2",
          time,
          value: time.map((_, i) => 1361 + i),
        },
      },
      warnings: ["a warning about the data"],
      cautions: ["Correlation is not attribution."],
    });
    const res = await svc.get(`/v1/runs/${run.id}/outputs/forcing?format=netcdf&calendar=360_day`);
    assert.equal(res.status, 200);
    assert.match(
      res.headers.get("content-disposition") ?? "",
      new RegExp(`${run.id}_forcing_360_day\\.nc`),
    );
    const r = new NetCDFReader(new Uint8Array(await res.arrayBuffer()));
    assert.equal(r.getAttribute("run_id"), run.id);
    assert.equal(r.getAttribute("result_digest"), `sha256:${run.result_digest}`);
    assert.equal(r.getAttribute("warnings"), "a warning about the data");
    assert.equal(r.getAttribute("cautions"), "Correlation is not attribution.");
    assert.equal(r.getAttribute("date_created"), run.created_at);
    assert.equal(
      attr(r, "radiative_forcing", "ancillary_variables"),
      "radiative_forcing_lower radiative_forcing_upper",
    );
    assert.equal(attr(r, "radiative_forcing", "standard_name"), undefined);
    const v = numbers(r, "radiative_forcing", 3);
    assert.equal(v[0], 0.1);
    assert.ok(Number.isNaN(v[1]));
    const b = numbers(r, "time_bnds", 6);
    assert.deepEqual([b[1] - b[0], b[3] - b[2]], [360, 360]);
    const p = await assertProblem(
      await svc.get(`/v1/runs/${run.id}/outputs/epoch?format=netcdf`),
      409,
    );
    assert.match(p.detail, /years from epoch/);
    const m = await svc.get(`/v1/runs/${run.id}/outputs/monthly?format=netcdf&calendar=julian`);
    assert.equal(m.status, 200);
    await m.body?.cancel();
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/series with application/x-netcdf stores a series read from the file", async (t) => {
  const svc = await makeTestApp();
  try {
    await t.step("NetCDF-4: quantity from standard_name, units from the file", async () => {
      const res = await postNetcdf(svc, "variable=tsi", await fixture("field_nc4.nc"));
      const body = await res.json();
      assert.equal(res.status, 201, JSON.stringify(body));
      assert.equal(body.series.quantity, "tsi");
      assert.equal(body.series.units, "W m-2");
      assert.equal(body.series.resolution, "monthly");
      assert.equal(body.series.start_date, "2001-01");
      assert.equal(body.report.calendar, "noleap");
      assert.deepEqual(body.report.metadata_from_file, ["quantity", "units"]);
      assert.match(body.report.time_placement, /middle of the same month/);
    });
    await t.step(
      "NetCDF-3 packed: masked values are gaps; the same file again is 200",
      async () => {
        const bytes = await fixture("packed.nc");
        const q = "variable=tsi_f32_fill&quantity=tsi&name=packed";
        const res = await postNetcdf(svc, q, bytes);
        const body = await res.json();
        assert.equal(res.status, 201, JSON.stringify(body));
        assert.equal(body.report.missing, 2);
        assert.equal(body.series.n, 22);
        const again = await postNetcdf(svc, q, bytes);
        assert.equal(again.status, 200);
        await again.body?.cancel();
      },
    );
    await t.step("a sunlag NetCDF file uploads back to the same values", async () => {
      const id = await uploadSeries(svc, TSI());
      const orig = await (await svc.get(`/v1/series/${id}`)).json();
      for (const cal of ["standard", "noleap", "360_day", "julian"]) {
        const nc = new Uint8Array(
          await (await svc.get(`/v1/series/${id}?format=netcdf&calendar=${cal}`)).arrayBuffer(),
        );
        const res = await postNetcdf(svc, "name=TSI%20(synthetic)", nc);
        const body = await res.json();
        assert.ok(res.status === 200 || res.status === 201, JSON.stringify(body));
        const back = await (await svc.get(`/v1/series/${body.series.id}`)).json();
        assert.deepEqual(back.value, orig.value, cal);
        assert.deepEqual(back.uncertainty, orig.uncertainty, cal);
        assert.deepEqual(back.date, orig.date, cal);
        for (let i = 0; i < orig.time.length; i++) {
          assert.ok(Math.abs(back.time[i] - orig.time[i]) < 1e-9, `${cal} time[${i}]`);
        }
        assert.equal(body.report.uncertainty_variable, "tsi_uncertainty");
      }
    });
  } finally {
    await svc.close();
    stopNetcdf4Worker();
  }
});

function fileWith(units: string, calendar: string, opts: { dims?: boolean } = {}): Uint8Array {
  return encodeNetcdf3({
    dimensions: [{ name: "time", size: 3 }, { name: "x", size: 2 }],
    variables: [
      {
        name: "time",
        type: "double",
        dimensions: ["time"],
        attributes: [ncText("units", units), ncText("calendar", calendar)],
        data: [0, 1, 2],
      },
      {
        name: "tsi",
        type: "double",
        dimensions: ["time"],
        attributes: [ncText("units", "W m-2")],
        data: [1, 2, 3],
      },
      {
        name: "grid",
        type: "double",
        dimensions: opts.dims ? ["x"] : ["time", "x"],
        data: opts.dims ? [1, 2] : [1, 2, 3, 4, 5, 6],
      },
    ],
  });
}

Deno.test("NetCDF uploads: bad input is a problem naming the field, and nothing is stored", async () => {
  const svc = await makeTestApp();
  try {
    const before = await seriesCount(svc);
    const cases: [
      string,
      Uint8Array | Promise<Uint8Array>,
      number,
      (p: Record<string, unknown>) => void,
    ][] = [
      [
        "quantity=tsi",
        new TextEncoder().encode("time,value\n2001,1\n"),
        415,
        (p) => assert.equal(p.reason, "not_netcdf"),
      ],
      ["quantity=tsi", new Uint8Array(0), 415, (p) => assert.equal(p.reason, "not_netcdf")],
      [
        "quantity=tsi&variable=tsi",
        fixture("packed.nc").then((b) => b.subarray(0, b.length - 30)),
        422,
        (p) => assert.equal(p.reason, "truncated"),
      ],
      [
        "quantity=tsi&variable=tsi",
        Promise.resolve(fileWith("months since 2000-01-01", "standard")),
        422,
        (p) => {
          assert.equal(p.reason, "bad_coordinate");
          assert.match(String(p.detail), /months/);
        },
      ],
      [
        "quantity=tsi&variable=tsi",
        Promise.resolve(fileWith("days since 2000-01-01", "lunar")),
        422,
        (p) => assert.match(String(p.detail), /Unknown calendar "lunar"/),
      ],
      [
        "quantity=tsi&variable=tsi",
        Promise.resolve(fileWith("days since 2001-02-29", "noleap")),
        422,
        (p) => assert.match(String(p.detail), /does not exist on the noleap calendar/),
      ],
      [
        "quantity=other&units=1&variable=grid",
        Promise.resolve(fileWith("days since 2000-01-01", "standard", { dims: true })),
        422,
        (p) => {
          assert.equal(p.reason, "wrong_dimensions");
          assert.equal(p.variable, "grid");
        },
      ],
      [
        "quantity=tsi&variable=nope",
        Promise.resolve(fileWith("days since 2000-01-01", "standard")),
        422,
        (p) => {
          assert.deepEqual((p.errors as { pointer: string }[])[0].pointer, "/variable");
        },
      ],
      [
        "quantity=tsi",
        fixture("cal_standard.nc"),
        422,
        (p) => assert.equal((p.errors as { pointer: string }[])[0].pointer, "/variable"),
      ],
      [
        "variable=tsi",
        Promise.resolve(fileWith("days since 2000-01-01", "standard")),
        422,
        (p) => assert.equal((p.errors as { pointer: string }[])[0].pointer, "/quantity"),
      ],
      [
        "quantity=tsi&units=K&variable=tsi",
        Promise.resolve(fileWith("days since 2000-01-01", "standard")),
        422,
        (p) => assert.ok((p.errors as { pointer: string }[]).some((e) => e.pointer === "/units")),
      ],
      [
        "quantity=tsi&variable=tsi&delimiter=comma",
        Promise.resolve(fileWith("days since 2000-01-01", "standard")),
        422,
        (p) => assert.equal((p.errors as { pointer: string }[])[0].pointer, "/delimiter"),
      ],
      [
        "quantity=tsi&variable=tas",
        fixture("field_nc4.nc"),
        422,
        (p) => assert.equal(p.reason, "wrong_dimensions"),
      ],
      [
        "quantity=other&units=1&variable=daily_value",
        fixture("cal_360_day.nc"),
        422,
        (p) => assert.match(String(p.detail), /2000-02-30/),
      ],
    ];
    for (const [q, body, status, check] of cases) {
      const p = await assertProblem(await postNetcdf(svc, q, await body), status);
      check(p);
      assert.ok(JSON.stringify(p).length < 4000, "bounded problem size");
      assert.doesNotMatch(JSON.stringify(p), /HDF5-DIAG|H5[A-Z]\w*\(|major:|minor:/);
    }
    assert.equal(await seriesCount(svc), before);
  } finally {
    await svc.close();
    stopNetcdf4Worker();
  }
});
