/**
 * The benchmark inputs of the solar-cycle area, from closed formulas so that
 * test/bench/cycles_numpy.py builds exactly the same arrays:
 *
 * - 3,600 months (300 years) of an invented activity record: an 11-year cycle of varying
 *   amplitude plus a deterministic "noise" term, clipped at 0;
 * - the same values at slightly uneven times t_i = 1700 + (i + 0.3 sin i) / 12 for the
 *   Lomb–Scargle periodogram, over 5,000 periods from 2 months to 100 years (grid even in
 *   frequency: sunlag's fast path; and even in period: its direct path).
 */
export const MONTHS = 3600;
export const PERIODS = 5000;

export function activity(months = MONTHS): Float64Array {
  return Float64Array.from({ length: months }, (_, i) => {
    const cyc = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / 131);
    const amp = 120 + 60 * Math.sin((2 * Math.PI * i) / 1000);
    const noise = 15 * Math.sin(0.7331 * i) * Math.sin(1.913 * i + 0.4);
    return Math.max(0, amp * cyc ** 1.5 + noise);
  });
}

export function unevenTimes(): Float64Array {
  return Float64Array.from({ length: MONTHS }, (_, i) => 1700 + (i + 0.3 * Math.sin(i)) / 12);
}

/** Month mid-points of 1700-01 .. 1999-12 as decimal years (for the cycle table). */
export function monthTimes(months = MONTHS): Float64Array {
  return Float64Array.from({ length: months }, (_, i) => 1700 + (i + 0.5) / 12);
}
