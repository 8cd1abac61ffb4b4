/**
 * Tidegauge on a three-node MariaDB Galera cluster behind HAProxy, with two server instances
 * reaching it through different nodes (tests/helpers/cluster.ts), under faults:
 * the schema and the demo seed on the cluster; sessions across instances; concurrent loads of
 * one series through both instances; a node killed with SIGKILL in the middle of a large load,
 * then rejoining, after which all three nodes must hold the same checksum for every vintage.
 */
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLUSTER_DB, collisions, startTestCluster, vintagesOn, type Instance, type TestCluster } from '../helpers/cluster.js';
import { bigSdmxLoad, insertMonthlySeries, readNdjson } from '../helpers/loads.js';
import { waitFor } from '../helpers/ports.js';

const root = path.resolve(import.meta.dirname, '..', '..');
let c: TestCluster;
let app1: Instance;
let app2: Instance;
let cookie: string;

beforeAll(async () => {
  c = await startTestCluster();
  [app1, app2] = c.apps;
  console.log(`cluster test set-up (ms): ${JSON.stringify(c.timings)}`);
  cookie = await signIn(app1, 'steward@demo.test');
}, 400_000);

afterAll(async () => {
  await c?.stop();
}, 120_000);

async function signIn(app: Instance, email: string) {
  const res = await fetch(`${app.base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email, password: 'tidegauge-demo' }) });
  expect(res.status).toBe(200);
  return res.headers.get('set-cookie')!.split(';')[0];
}

const get = (app: Instance, p: string, who = cookie) => fetch(`${app.base}/api/v1${p}`, { headers: { Cookie: who } });

/** Loads a quarterly release (40 quarters from 2015-Q1) into a series through one instance. */
async function loadRelease(app: Instance, seriesId: number, level: number) {
  const rows = Array.from({ length: 40 }, (_, q) => `${2015 + Math.floor(q / 4)}-Q${(q % 4) + 1},${(level + q * 0.25).toFixed(3)}`);
  const form = new FormData();
  form.append('file', new Blob([['period,value', ...rows].join('\n') + '\n']), `release-${level}.csv`);
  const res = await fetch(`${app.base}/api/v1/series/${seriesId}/vintages`, { method: 'POST', headers: { Cookie: cookie, Origin: app.base }, body: form });
  return { status: res.status, body: (await res.json()) as any };
}

async function createSeries(code: string) {
  const res = await fetch(`${app1.base}/api/v1/series`, {
    method: 'POST',
    headers: { Cookie: cookie, Origin: app1.base, 'Content-Type': 'application/json' },
    body: JSON.stringify({ code, title: `${code} (invented, cluster test)`, frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }),
  });
  expect(res.status).toBe(201);
  return ((await res.json()) as { id: number }).id;
}

describe('the schema and the demo seed on a Galera cluster', () => {
  it('migrate and seed; every node has every table with a primary key, on InnoDB, with the immutability triggers', async () => {
    const counts: string[] = [];
    for (let i = 0; i < 3; i++) {
      const db = c.nodeDb(i);
      const [noKey] = await db.raw(
        `SELECT t.table_name AS name FROM information_schema.tables t
         LEFT JOIN information_schema.table_constraints k ON k.table_schema = t.table_schema AND k.table_name = t.table_name AND k.constraint_type = 'PRIMARY KEY'
         WHERE t.table_schema = ? AND t.table_type = 'BASE TABLE' AND k.constraint_name IS NULL`,
        [CLUSTER_DB],
      );
      expect(noKey).toEqual([]);
      const [engines] = await db.raw(`SELECT table_name AS name, engine FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE' AND engine <> 'InnoDB'`, [CLUSTER_DB]);
      expect(engines).toEqual([]);
      const [triggers] = await db.raw('SELECT trigger_name AS name FROM information_schema.triggers WHERE trigger_schema = ? ORDER BY trigger_name', [CLUSTER_DB]);
      expect(triggers.map((t: { name: string }) => t.name).sort()).toEqual(['exhibit_supersessions_no_delete', 'exhibit_supersessions_no_update', 'observations_no_delete', 'observations_no_update', 'series_grams_insert', 'series_grams_update', 'vintage_metadata_no_delete', 'vintage_metadata_no_update', 'vintages_no_delete', 'vintages_no_update']);
      const [[settings]] = await db.raw('SELECT @@binlog_format AS binlog, @@innodb_autoinc_lock_mode AS autoinc, @@wsrep_sync_wait AS syncWait, @@wsrep_mode AS mode');
      expect(settings).toMatchObject({ binlog: 'ROW', autoinc: 2, syncWait: 1 });
      expect(settings.mode).toMatch(/REQUIRED_PRIMARY_KEY/);
      expect((await c.galera.status(i)).wsrep_cluster_size).toBe('3');
      const row = await db('vintages').count({ v: '*' }).first();
      const obs = await db('observations').count({ o: '*' }).first();
      const people = await db('users').count({ u: '*' }).first();
      counts.push(`${row!.v}/${obs!.o}/${people!.u}`);
    }
    // The demo workspace (six series with their vintages, five people) is on every node.
    expect(new Set(counts).size).toBe(1);
    expect(Number(counts[0].split('/')[0])).toBeGreaterThan(6);

    // The triggers, created through node 1, refuse changes made through node 2.
    await expect(c.nodeDb(1)('vintages').update({ note: 'changed' }).limit(1)).rejects.toThrow(/vintages are immutable/);
    // The cluster refuses what it could not replicate safely: a table without a primary key.
    await expect(c.nodeDb(2).raw('CREATE TABLE no_key (a INT)')).rejects.toThrow();
  });

  it('uses nothing that Galera does not replicate: no named locks, LOCK TABLES, or other storage engines', () => {
    // Named locks and LOCK TABLES hold on one node only; MyISAM, Aria and MEMORY tables are not replicated.
    const forbidden = /\b(GET_LOCK|RELEASE_LOCK|IS_FREE_LOCK|LOCK\s+TABLES?|FLUSH\s+TABLES\s+WITH\s+READ\s+LOCK|MyISAM|ENGINE\s*=\s*(?!InnoDB)\w+|XA\s+START)\b/i;
    const hits: string[] = [];
    const walk = (dir: string) => {
      for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
        const full = path.join(dir, entry.name);
        if (entry.isDirectory()) walk(full);
        else if (/\.(ts|mjs|sql)$/.test(entry.name)) {
          fs.readFileSync(full, 'utf8').split('\n').forEach((line, n) => {
            if (forbidden.test(line)) hits.push(`${path.relative(root, full)}:${n + 1}: ${line.trim()}`);
          });
        }
      }
    };
    for (const d of ['server', 'migrations', 'seeds']) walk(path.join(root, d));
    expect(hits).toEqual([]);
  });
});

describe('sessions across instances on different nodes', () => {
  it('a session made through one instance works at once on the other, and a sign-out ends it on both', async () => {
    for (let round = 0; round < 5; round++) {
      const [made, other] = round % 2 ? [app2, app1] : [app1, app2];
      const session = await signIn(made, 'economist@demo.test');
      // No pause: the other node must already see the session row (causal reads, wsrep_sync_wait=1).
      const me = await get(other, '/auth/me', session);
      expect(me.status).toBe(200);
      expect((await me.json()).user.email).toBe('economist@demo.test');
      const out = await fetch(`${other.base}/api/v1/auth/sign-out`, { method: 'POST', headers: { Cookie: session, Origin: other.base } });
      expect(out.status).toBe(200);
      expect((await get(made, '/auth/me', session)).status).toBe(401);
    }
  });
});

describe('concurrent loads of one series through both instances', () => {
  it('both land, as vintages n and n+1, with the certification conflicts retried and never answered 500', async () => {
    const id = await createSeries('CLUSTER_CONCURRENT');
    const before = await collisions(c.galera);
    const numbers: number[] = [];
    for (let round = 0; round < 8; round++) {
      const [a, b] = await Promise.all([loadRelease(app1, id, 100 + round * 2), loadRelease(app2, id, 101 + round * 2)]);
      expect([a.status, b.status], JSON.stringify([a.body.error, b.body.error])).toEqual([201, 201]);
      const pair = [a.body.vintage.number, b.body.vintage.number].sort((x, y) => x - y);
      expect(pair[1]).toBe(pair[0] + 1);
      numbers.push(...pair);
    }
    expect(numbers).toEqual(Array.from({ length: 16 }, (_, k) => k + 1));
    // The two writers did collide on the cluster (and the losers ran again): without the
    // retries these would have been errors.
    const after = await collisions(c.galera);
    console.log(`write collisions during 8 rounds of concurrent loads: ${after - before}`);
    expect(after - before).toBeGreaterThan(0);
    // Every node holds the 16 vintages with the same checksums.
    const held = await Promise.all([0, 1, 2].map(async (i) => (await c.nodeDb(i)('vintages').where('series_id', id).orderBy('number').select('number', 'checksum')).map((v) => `${v.number}:${v.checksum}`)));
    expect(held[0]).toHaveLength(16);
    expect(held[1]).toEqual(held[0]);
    expect(held[2]).toEqual(held[0]);
  }, 120_000);
});

describe('rules that span rows, across nodes', () => {
  it('two administrators removing each other at the same moment through different nodes leave one administrator', async () => {
    // A row lock holds on one node only, and the two changes write different rows: the last-admin
    // rule must still hold (write skew), in every round.
    const users = async () => (await c.nodeDb(0)('users').whereIn('email', ['admin@demo.test', 'editor@demo.test']).select('id', 'email')).reduce((m, u) => ({ ...m, [u.email]: u.id as number }), {} as Record<string, number>);
    const ids = await users();
    const first = await signIn(app1, 'admin@demo.test');
    const second = await signIn(app2, 'editor@demo.test');
    const patch = (app: Instance, who: string, id: number, roles: string[]) =>
      fetch(`${app.base}/api/v1/users/${id}`, { method: 'PATCH', headers: { Cookie: who, Origin: app.base, 'Content-Type': 'application/json' }, body: JSON.stringify({ roles }) });
    const admins = async () => Number((await c.nodeDb(0)('user_roles as r').join('users as u', 'u.id', 'r.user_id').where({ 'r.role': 'admin', 'u.status': 'active' }).count({ n: '*' }))[0].n);
    let raced = 0;
    for (let round = 0; round < 6; round++) {
      // Both are administrators again: whoever is one makes the other one too.
      const holder = (await c.nodeDb(0)('user_roles').where({ user_id: ids['admin@demo.test'], role: 'admin' }).first()) ? { app: app1, who: first } : { app: app2, who: second };
      expect((await patch(holder.app, holder.who, ids['admin@demo.test'], ['admin'])).status).toBe(200);
      expect((await patch(holder.app, holder.who, ids['editor@demo.test'], ['editor', 'admin'])).status).toBe(200);
      expect(await admins()).toBe(2);
      const [a, b] = await Promise.all([patch(app1, first, ids['editor@demo.test'], ['editor']), patch(app2, second, ids['admin@demo.test'], ['viewer'])]);
      const codes = [a.status, b.status].sort();
      expect(await admins(), `round ${round}: answers ${codes}`).toBe(1);
      // One change went through. The other is refused: 409 last_admin when the two ran at the
      // same moment, or 403 when it arrived after its sender had already lost the admin role.
      expect(codes[0]).toBe(200);
      const refused = a.status === 200 ? b : a;
      const code = ((await refused.json()) as any).error.code;
      expect([`${refused.status} ${code}`]).toEqual([refused.status === 409 ? '409 last_admin' : '403 role_required']);
      raced += refused.status === 409 ? 1 : 0;
    }
    // The two did overlap in most rounds (else this would not test the rule across nodes).
    console.log(`administrator removals that ran at the same moment: ${raced} of 6`);
    expect(raced).toBeGreaterThanOrEqual(2);
  }, 120_000);
});

describe('a node killed with SIGKILL in the middle of a large load', () => {
  it('the load is stored whole or answered 503, no acknowledged load is lost, the instances keep answering, and after the rejoin every node holds the same checksum for every vintage', async () => {
    await insertMonthlySeries(c.nodeDb(1), 'K', 300);
    const small = await createSeries('CLUSTER_DURING_FAULT');
    const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

    // Meanwhile: loads through instance 2 (node 2), reads through both instances.
    let running = true;
    const acked: { number: number; checksum: string; at: number }[] = [];
    const loadAnswers: { status: number; code?: string }[] = [];
    const writer = (async () => {
      for (let level = 500; running; level++) {
        const at = Date.now();
        const r = await loadRelease(app2, small, level);
        loadAnswers.push({ status: r.status, code: r.body.error?.code });
        if (r.status === 201) acked.push({ number: r.body.vintage.number, checksum: r.body.vintage.checksum, at });
        await sleep(100);
      }
    })();
    const reads: Record<string, { status: number; code?: string; at: number; ms: number }[]> = { app1: [], app2: [] };
    const reader = (app: Instance, list: (typeof reads)['app1']) =>
      (async () => {
        while (running) {
          const t0 = Date.now();
          const r = await get(app, '/series').then(async (x) => ({ status: x.status, code: x.status === 200 ? undefined : ((await x.json()) as any).error?.code }), () => ({ status: 0, code: 'no answer' }));
          list.push({ ...r, at: t0, ms: Date.now() - t0 });
          await sleep(100);
        }
      })();
    const readers = [reader(app1, reads.app1), reader(app2, reads.app2)];
    await sleep(1000);

    // The large load goes through instance 1, whose database front end sends it to node 1.
    const form = new FormData();
    form.append('file', new Blob([bigSdmxLoad({ prefix: 'K', count: 300, months: 500 })]), 'big.csv');
    let killedAt = 0;
    const res = await fetch(`${app1.base}/api/v1/loads`, { method: 'POST', headers: { Cookie: cookie, Origin: app1.base, Accept: 'application/x-ndjson' }, body: form });
    const loaded = await readNdjson(res, /"phase":"storing","done":[1-9]/, async () => {
      killedAt = Date.now();
      await c.galera.killNode(0);
    });
    expect(loaded.matched).toBe(true);
    if (loaded.last.type === 'error') expect([loaded.last.status, loaded.last.error.code]).toEqual([503, 'database_unavailable']);
    else expect(loaded.last.result.vintages).toHaveLength(300);

    // HAProxy takes node 1 out, and instance 1 answers again through node 2.
    await c.haproxy.waitFor('db_1', 'node1', 'DOWN', 20_000);
    expect(await waitFor(async () => (await get(app1, '/series')).status === 200, 20_000)).toBe(true);
    const failoverMs = Date.now() - killedAt;
    // Writes and reads go on while node 1 is away, so it has something to catch up on and instance
    // 2 shows it kept answering: at least 3 s, and until instance 2 has answered six reads and
    // stored three loads begun after the kill (a slow machine can take the cluster seconds to
    // settle on its new membership, and the reads wait for it).
    await sleep(3000);
    const kept = await waitFor(async () => reads.app2.filter((r) => r.at > killedAt).length > 5 && acked.filter((a) => a.at > killedAt).length >= 3, 30_000);
    running = false;
    await Promise.all([writer, ...readers]);

    // Node 1 rejoins and catches up on what it missed from the others' write-set cache (IST).
    const rejoin = await c.galera.startNode(0);
    expect(rejoin.transfer).toBe('IST');
    await c.haproxy.waitFor('db_1', 'node1', 'UP', 30_000);

    // Every answer was a real one: stored, or a 503 in the error shape; never a 500, never silence.
    for (const a of loadAnswers) expect([201, 503]).toContain(a.status);
    for (const a of loadAnswers.filter((x) => x.status === 503)) expect(['database_unavailable', 'write_conflict']).toContain(a.code);
    for (const r of [...reads.app1, ...reads.app2]) expect([200, 503]).toContain(r.status);
    // Instance 2's node stayed up: all its reads were answered with data.
    expect(reads.app2.every((r) => r.status === 200)).toBe(true);
    const afterKill = reads.app2.filter((r) => r.at > killedAt);
    const timeline = `kill at +0 ms; instance 2 reads begun after it: ${afterKill.map((r) => `+${r.at - killedAt} (${r.ms} ms)`).join(', ')}`;
    expect(kept, timeline).toBe(true);
    expect(afterKill.length, timeline).toBeGreaterThan(5);
    expect(acked.filter((a) => a.at > killedAt).length, timeline).toBeGreaterThanOrEqual(3);
    console.log(
      `fault: load answer ${loaded.last.type === 'error' ? `503 ${loaded.last.error.code}` : 'stored'}; instance 1 answered again ${failoverMs} ms after the kill; ` +
        `instance 2: ${loadAnswers.length} loads (${acked.length} stored, ${loadAnswers.filter((a) => a.status === 503).length} answered 503), slowest read ${Math.max(...reads.app2.map((r) => r.ms))} ms; ` +
        `instance 1 reads answered 503: ${reads.app1.filter((r) => r.status === 503).length} of ${reads.app1.length}; node 1 rejoined by ${rejoin.transfer} in ${rejoin.ms} ms; ${afterKill.length} instance 2 reads begun after the kill, the first answered in ${afterKill[0]?.ms} ms`,
    );

    // All three nodes hold the same vintages, each matching the checksum of its own observations.
    const held = await Promise.all([0, 1, 2].map((i) => vintagesOn(c.nodeDb(i))));
    for (const node of held) {
      for (const [key, v] of node) {
        expect(v.recomputed, key).toBe(v.checksum);
        expect(v.rows, key).toBe(v.rowCount);
      }
    }
    const listing = held.map((node) => [...node.entries()].map(([k, v]) => `${k}:${v.checksum}`).sort());
    expect(listing[1]).toEqual(listing[0]);
    expect(listing[2]).toEqual(listing[0]);
    // No acknowledged load is lost.
    for (const a of acked) for (const node of held) expect(node.get(`${small}#${a.number}`)?.checksum).toBe(a.checksum);
    // The large load is there whole or not at all, and whole if it was acknowledged.
    const [{ n }] = await c.nodeDb(0)('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'like', 'K\\_%').count({ n: '*' });
    expect(loaded.last.type === 'result' ? [300] : [0, 300]).toContain(Number(n));
  }, 240_000);
});
