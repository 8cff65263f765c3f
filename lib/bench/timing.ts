/**
 * What every benchmark script shares: its command-line options, the median, and the timing of a
 * function over several runs (wall time, CPU time of the process's threads, best wall time).
 * Figures taken on a loaded machine are read by their CPU time and best wall time; the targets
 * are wall times on a quiet machine.
 */

/** The value after `--name` on the command line, or the fallback. */
export function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(name);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

/** The median of a non-empty list. */
export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

export interface Timing {
  /** Median wall time (ms). */
  wallMs: number;
  /** Best wall time (ms). */
  bestMs: number;
  /** Median CPU time of the process, all its threads (ms): what the work costs whatever else runs on the machine. */
  cpuMs: number;
}

/** Median wall and CPU time of fn over `runs` runs (after `warmup` unmeasured runs), and the best wall time. */
export async function time(fn: () => unknown, runs: number, warmup = 1): Promise<Timing> {
  for (let i = 0; i < warmup; i++) await fn();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    await fn();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { wallMs: median(wall), bestMs: Math.min(...wall), cpuMs: median(cpu) };
}
