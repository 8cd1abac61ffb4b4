/**
 * One worker thread for printing (PDFs of exhibits and publication packs), started on first use and
 * ended when idle, so a pack of many exhibits does not hold up the requests of everyone else.
 */
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { Snapshot } from '../schemas/exhibits.js';

let pool: Piscina | null = null;

export async function printPdf(items: { snapshot: Snapshot; number?: string | null }[], meta: { title: string; institution?: string }): Promise<Buffer> {
  pool ??= new Piscina({ filename: fileURLToPath(new URL('./print.worker.mjs', import.meta.url)), minThreads: 0, maxThreads: 1, idleTimeout: 15_000, resourceLimits: { maxOldGenerationSizeMb: 1024 } });
  const bytes = (await pool.run({ items, meta })) as ArrayBuffer;
  return Buffer.from(bytes);
}

/** Ends the printing thread (the app's shutdown). */
export async function closePrintPool() {
  if (pool) await pool.destroy();
  pool = null;
}
