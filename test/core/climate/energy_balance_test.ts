import assert from "node:assert/strict";
import {
  fitSinusoid,
  oneBoxResponse,
  oneBoxSinusoidResponse,
  oneBoxSinusoidStart,
  twoBoxResponse,
  twoBoxSinusoidResponse,
  twoBoxSinusoidStart,
  twoBoxTransfer,
} from "../../../core/climate/energy_balance.ts";

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

// IPCC AR6 WG1 §7.3.4.4: ΔTSI about 1 W m-2 peak to peak, albedo 0.29 → F₀ = 0.25 · 0.71 / 2
const F0 = (1.0 * (1 - 0.29)) / 4 / 2;

Deno.test("oneBoxSinusoidResponse() reproduces the worked table of the one-box sinusoid", () => {
  assert.ok(Math.abs(F0 - 0.08875) < 1e-15);
  // derived from the steady state of C dT/dt = F − λT: T_pp = 2F₀/√(λ² + C²ω²), φ = arctan(Cω/λ)
  const table = [
    { c: 8.0, pp: 0.0374, phaseDeg: 74.1, lag: 2.26 },
    { c: 6.68, pp: 0.0440, phaseDeg: 71.2, lag: 2.18 },
  ];
  for (const row of table) {
    const r = oneBoxSinusoidResponse({ heatCapacity: row.c, feedback: 1.3 }, 11);
    assert.ok(Math.abs(2 * F0 * r.gain - row.pp) < 5e-5, `pp C=${row.c}`);
    assert.ok(Math.abs((r.phase * 180) / Math.PI - row.phaseDeg) < 0.05, `phase C=${row.c}`);
    assert.ok(Math.abs(r.lagYears - row.lag) < 5e-3, `lag C=${row.c}`);
  }
  // equilibrium limit C → 0: 2F₀/λ = 0.137 K, no lag
  const eq = oneBoxSinusoidResponse({ heatCapacity: 1e-9, feedback: 1.3 }, 11);
  assert.ok(Math.abs(2 * F0 * eq.gain - 0.137) < 5e-4);
  assert.ok(eq.lagYears < 1e-8);
});

function sineRun(stepsPerYear: number, years: number, period: number) {
  const n = Math.round(stepsPerYear * years) + 1;
  const time = Float64Array.from({ length: n }, (_, i) => i / stepsPerYear);
  const forcing = time.map((t) => F0 * Math.sin((2 * Math.PI * t) / period));
  return { time, forcing };
}

Deno.test("oneBoxResponse() matches the analytic amplitude and lag to 1e-4 relative", () => {
  const p = { heatCapacity: 8, feedback: 1.3 }, P = 11;
  const a = oneBoxSinusoidResponse(p, P);
  const { time, forcing } = sineRun(365, 110, P);
  // start on the steady state so no transient remains: T(0) = gain F₀ sin(−φ)
  const T = oneBoxResponse(time, forcing, p, a.gain * F0 * Math.sin(-a.phase));
  const f = fitSinusoid(time, T, P);
  assert.ok(rel(f.amplitude, a.gain * F0) < 1e-4, `amplitude ${f.amplitude} vs ${a.gain * F0}`);
  assert.ok(rel(f.lagYears, a.lagYears) < 1e-4, `lag ${f.lagYears} vs ${a.lagYears}`);
  // and from rest: after the transient (τ = C/λ ≈ 6 yr) the last 5 periods agree too
  const T0 = oneBoxResponse(time, forcing, p);
  const k = time.length - 5 * 11 * 365;
  const g = fitSinusoid(time.slice(k), T0.slice(k), P);
  assert.ok(rel(g.amplitude, a.gain * F0) < 1e-4);
  // monthly sampling reads the sine piecewise-linearly: amplitude low by ≈ (ωh)²/12
  const m = sineRun(12, 110, P);
  const Tm = oneBoxResponse(m.time, m.forcing, p, a.gain * F0 * Math.sin(-a.phase));
  const fm = fitSinusoid(m.time, Tm, P);
  const expected = ((2 * Math.PI) / P / 12) ** 2 / 12;
  assert.ok(Math.abs(1 - fm.amplitude / (a.gain * F0) - expected) < 0.2 * expected);
});

/** Classical RK4 on the two-box ODE with forcing interpolated linearly (independent check). */
function rk4TwoBox(
  time: Float64Array,
  forcing: Float64Array,
  p: { heatCapacity: number; deepHeatCapacity: number; feedback: number; exchange: number },
  x0: [number, number],
  sub: number,
): Float64Array {
  const out = new Float64Array(time.length);
  let [T, D] = x0;
  out[0] = T;
  const rhs = (f: number, t: number, d: number): [number, number] => [
    (f - p.feedback * t - p.exchange * (t - d)) / p.heatCapacity,
    (p.exchange * (t - d)) / p.deepHeatCapacity,
  ];
  for (let i = 1; i < time.length; i++) {
    const h = (time[i] - time[i - 1]) / sub;
    for (let j = 0; j < sub; j++) {
      const fa = forcing[i - 1] + ((forcing[i] - forcing[i - 1]) * j) / sub;
      const fb = forcing[i - 1] + ((forcing[i] - forcing[i - 1]) * (j + 0.5)) / sub;
      const fc = forcing[i - 1] + ((forcing[i] - forcing[i - 1]) * (j + 1)) / sub;
      const k1 = rhs(fa, T, D);
      const k2 = rhs(fb, T + (h / 2) * k1[0], D + (h / 2) * k1[1]);
      const k3 = rhs(fb, T + (h / 2) * k2[0], D + (h / 2) * k2[1]);
      const k4 = rhs(fc, T + h * k3[0], D + h * k3[1]);
      T += (h / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
      D += (h / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
    }
    out[i] = T;
  }
  return out;
}

Deno.test("twoBoxResponse() agrees with RK4 and with the analytic sinusoid response", () => {
  const p = { heatCapacity: 7.3, deepHeatCapacity: 106, feedback: 1.3, exchange: 0.7 };
  // an arbitrary ramp-and-pulse forcing, monthly
  const time = Float64Array.from({ length: 1200 }, (_, i) => 1900 + i / 12);
  const forcing = time.map((t) => 0.02 * (t - 1900) - (t > 1950 && t < 1952 ? 2 : 0));
  const exact = twoBoxResponse(time, forcing, p);
  const rk = rk4TwoBox(time, forcing, p, [0, 0], 8);
  for (let i = 0; i < time.length; i += 50) assert.ok(Math.abs(exact.surface[i] - rk[i]) < 1e-9);
  // sinusoid, started on the steady state of both boxes
  const P = 11, w = (2 * Math.PI) / P;
  const a = twoBoxSinusoidResponse(p, P);
  const h = twoBoxTransfer(p, w);
  const s = sineRun(365, 110, P);
  // F = F₀ sin ωt = Im(F₀ e^{iωt}) → X(0) = Im(h F₀) = F₀ Im h
  const r = twoBoxResponse(s.time, s.forcing, p, [F0 * h.surfaceIm, F0 * h.deepIm]);
  const f = fitSinusoid(s.time, r.surface, P);
  assert.ok(rel(f.amplitude, a.gain * F0) < 1e-4, `amplitude ${f.amplitude} vs ${a.gain * F0}`);
  assert.ok(rel(f.lagYears, a.lagYears) < 1e-4, `lag ${f.lagYears} vs ${a.lagYears}`);
  // the deep ocean damps the surface response relative to the one-box model with the same C
  const one = oneBoxSinusoidResponse(p, P);
  assert.ok(a.gain < one.gain);
});

Deno.test("energy-balance functions reject bad input", () => {
  const t = new Float64Array([0, 1, 2]);
  assert.throws(() => oneBoxResponse(t, new Float64Array([0, 1])), {
    name: "InputError",
    field: "forcing",
    reason: "length_mismatch",
  });
  assert.throws(() => oneBoxResponse(new Float64Array([0, 0, 1]), t), {
    field: "time",
    reason: "not_increasing",
    index: 1,
  });
  assert.throws(() => oneBoxResponse(t, new Float64Array([0, NaN, 1])), {
    field: "forcing",
    reason: "not_finite",
    index: 1,
  });
  assert.throws(() => oneBoxResponse(t, t, { heatCapacity: 0, feedback: 1 }), {
    field: "heatCapacity",
    value: 0,
  });
  assert.throws(
    () => twoBoxResponse(t, t, { heatCapacity: 1, deepHeatCapacity: 1, feedback: 1, exchange: -1 }),
    { field: "exchange", reason: "out_of_range" },
  );
  assert.throws(() => oneBoxSinusoidResponse({ heatCapacity: 8, feedback: 1.3 }, 0), {
    field: "period",
  });
});

Deno.test("oneBoxSinusoidStart() and twoBoxSinusoidStart() are the steady state at t = 0", () => {
  // T(t) = F₀ · gain · sin(ωt − φ) at t = 0, from the analytic responses
  const one = { heatCapacity: 8, feedback: 1.3 };
  const r1 = oneBoxSinusoidResponse(one, 11);
  assert.ok(
    Math.abs(oneBoxSinusoidStart(one, 11, 0.2) - 0.2 * r1.gain * Math.sin(-r1.phase)) < 1e-15,
  );
  const two = { heatCapacity: 7.3, deepHeatCapacity: 106, feedback: 1.3, exchange: 0.7 };
  const r2 = twoBoxSinusoidResponse(two, 11);
  const [t0] = twoBoxSinusoidStart(two, 11, 0.2);
  assert.ok(Math.abs(t0 - 0.2 * r2.gain * Math.sin(-r2.phase)) < 1e-12);
  assert.throws(() => twoBoxSinusoidStart(two, 0, 0.2), { name: "InputError", field: "period" });
});
