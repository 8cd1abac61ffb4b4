/** Timing helpers shared by the bench scripts: medians of repeated runs after a warm-up, with a GC between runs when node runs with --expose-gc. */
export const gc = (globalThis as { gc?: () => void }).gc ?? (() => {});

export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export function time(f: () => void, reps: number, warmup = 2): number {
  for (let i = 0; i < warmup; i++) f();
  const ts: number[] = [];
  for (let i = 0; i < reps; i++) {
    gc();
    const t = performance.now();
    f();
    ts.push(performance.now() - t);
  }
  return median(ts);
}

export async function timeAsync(f: () => Promise<unknown>, reps: number, warmup = 2): Promise<number> {
  for (let i = 0; i < warmup; i++) await f();
  const ts: number[] = [];
  for (let i = 0; i < reps; i++) {
    gc();
    const t = performance.now();
    await f();
    ts.push(performance.now() - t);
  }
  return median(ts);
}
