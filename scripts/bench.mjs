// `npm run bench`: speed and memory of the decomposition library and of large loads, with the
// reference libraries (statsmodels, scipy) timed in the same run. Figures are medians.
import { spawnSync } from 'node:child_process';
import { ensureNodeModules, provideDatabase, root, tsxArgs } from './lib/setup.mjs';

ensureNodeModules();
const only = process.argv.slice(2);
let code = 0;
if (only.length === 0 || only.includes('analysis')) {
  code ||= spawnSync(process.execPath, ['--expose-gc', ...tsxArgs('scripts/bench/analysis.ts')], { cwd: root, stdio: 'inherit' }).status ?? 1;
}
if (only.length === 0 || only.includes('methods')) {
  code ||= spawnSync(process.execPath, ['--expose-gc', ...tsxArgs('scripts/bench/methods.ts')], { cwd: root, stdio: 'inherit' }).status ?? 1;
}
if (only.length === 0 || only.includes('loads')) {
  const db = await provideDatabase('tidegauge_bench');
  code ||= spawnSync(process.execPath, ['--expose-gc', ...tsxArgs('scripts/bench/loads.ts')], { cwd: root, stdio: 'inherit', env: { ...process.env, DATABASE_URL: db.url } }).status ?? 1;
  if (db.owned) await db.stop();
}
if (only.length === 0 || only.includes('history')) {
  const db = await provideDatabase('tidegauge_bench');
  code ||= spawnSync(process.execPath, ['--expose-gc', ...tsxArgs('scripts/bench/history.ts')], { cwd: root, stdio: 'inherit', env: { ...process.env, DATABASE_URL: db.url } }).status ?? 1;
  if (db.owned) await db.stop();
}
process.exit(code);
