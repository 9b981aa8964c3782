/**
 * Options of the side-by-side benchmarks that compare two checkouts (`--a DIR_A --b DIR_B`),
 * read from the command line as `--name value`, and the load average they print.
 *
 * @module
 */

/** The value after `--name` in `args`, else `dflt`. */
export function optionReader(args: readonly string[] = Deno.args) {
  return (name: string, dflt?: string): string | undefined => {
    const i = args.indexOf(`--${name}`);
    return i >= 0 ? args[i + 1] : dflt;
  };
}

/** The two checkouts (`--a`, `--b`), rounds, seconds per round and `--only` cases. */
export function abOptions(defaults: { rounds: number; seconds?: number }) {
  const arg = optionReader();
  return {
    arg,
    dirs: { a: arg("a")!, b: arg("b")! },
    rounds: Number(arg("rounds", String(defaults.rounds))),
    seconds: Number(arg("seconds", String(defaults.seconds ?? 5))),
    only: arg("only")?.split(","),
  };
}

/** The 1, 5 and 15-minute load averages, as /proc/loadavg gives them. */
export const loadAverage = (): string =>
  Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).join(" ");
