// Worker-thread entry for decompositions (single large or costly ones, and batches). Plain JavaScript so that it loads in any host
// (the server under tsx, or a test runner): it registers tsx, then loads the TypeScript task.
import { move, transferableSymbol, valueSymbol } from 'piscina';
import { register } from 'tsx/esm/api';

register();
const { runBatchChunk, runSingle, runStoredChunk } = await import('./decompose-task.ts');

export default function task(input) {
  if (input.kind === 'single') {
    const result = runSingle(input);
    // The answer's bytes are moved to the main thread, not copied.
    return result.ok ? move({ [transferableSymbol]: result.body.buffer, [valueSymbol]: result }) : result;
  }
  return input.kind === 'stored' ? runStoredChunk(input) : runBatchChunk(input);
}
