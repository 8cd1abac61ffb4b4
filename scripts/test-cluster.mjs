// `npm run test:cluster`: only the Galera cluster tests (tests/cluster/), after the same set-up as
// `npm test` minus the browser: npm packages, and MariaDB with Galera, rsync and HAProxy from
// Debian's packages. `npm test` runs these tests too, last.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { ensureClusterPackages, ensureNodeModules, log, root } from './lib/setup.mjs';

ensureNodeModules();
ensureClusterPackages();
log('running the cluster tests (vitest --project cluster)…');
const env = { ...process.env, NODE_ENV: 'test' };
delete env.DATABASE_URL;
const vitest = spawn(path.join(root, 'node_modules', '.bin', 'vitest'), ['run', '--project', 'cluster', ...process.argv.slice(2)], { cwd: root, env, stdio: 'inherit' });
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => vitest.kill(signal));
vitest.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
