// Worker-thread entry for batch decompositions. Plain JavaScript so that it loads in any host
// (the server under tsx, or a test runner): it registers tsx, then loads the TypeScript task.
import { register } from 'tsx/esm/api';

register();
const { runBatchChunk, runStoredChunk } = await import('./decompose-task.ts');

export default function task(input) {
  return input.kind === 'stored' ? runStoredChunk(input) : runBatchChunk(input);
}
