/**
 * SDMX out, read by a real SDMX client: Debian's R package rsdmx (r-cran-rsdmx, installed by the
 * test set-up) reads our dataflow, data structure and data over HTTP with a token, into data frames
 * whose values are the stored vintage's (latest, or in force on an `asOf` date). SDMX-CSV is read
 * by Python's csv module. And a feed reads our own SDMX out (one instance reading itself).
 */
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let s: TestServer;
let steward: Awaited<ReturnType<typeof signedIn>>;
let token: string;
let base: string;

beforeAll(async () => {
  s = await startServer({}, { seedDemo: true });
  steward = await signedIn(s, 'steward@demo.test');
  token = (await steward.post('/api/v1/tokens').send({ name: 'rsdmx' }).expect(201)).body.token;
  base = `${s.url}/api/v1/sdmx`;
});
afterAll(() => s.close());

/** Runs R with rsdmx (asynchronously: the server answering it is in this process). */
async function rsdmx(body: string): Promise<string> {
  const script = `suppressMessages(library(rsdmx))\nh <- list(Authorization = "Bearer ${token}")\n${body}`;
  const { stdout } = await promisify(execFile)('Rscript', ['-e', script], { encoding: 'utf8', timeout: 120_000 });
  return stdout;
}

/** A data frame written by R's write.table (tab-separated), read back as rows of named cells. */
function frame(tsv: string): Record<string, string>[] {
  const [head, ...rows] = tsv.trim().split('\n').map((l) => l.split('\t'));
  return rows.map((r) => Object.fromEntries(head.map((h, i) => [h, r[i]])));
}

async function stored(code: string, pick: { number?: number; asOf?: string } = {}) {
  const q = s.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', code);
  if (pick.number) q.where('v.number', pick.number);
  if (pick.asOf) q.where('v.as_of', '<=', pick.asOf);
  const v = await q.orderBy('v.number', 'desc').first('v.id', 'v.number', 'v.as_of');
  const rows = await s.db('observations').where('vintage_id', v.id).orderBy('period');
  return { number: v.number as number, asOf: new Date(v.as_of).toISOString().slice(0, 10), periods: rows.map((r) => r.period as string), values: rows.map((r) => (r.value === null ? null : Number(r.value))) };
}

describe('SDMX out read by rsdmx', () => {
  it('reads the dataflow and the data structure, whose series codelist is the Catalogue', async () => {
    const out = await rsdmx(`
f <- as.data.frame(readSDMX("${base}/dataflow", headers = h))
cat(f$id, f$agencyID, f$version, f$dsdRef, "\\n")
d <- readSDMX("${base}/datastructure/TIDEGAUGE/DSD_SERIES/latest", headers = h)
cat(as.data.frame(slot(d, "codelists"), codelistId = "CL_SERIES_CODE")$id, "\\n")
cat(as.data.frame(slot(d, "codelists"), codelistId = "CL_FREQ")$id, "\\n")
cat(sapply(slot(slot(slot(d, "datastructures"), "datastructures")[[1]], "Components")@Dimensions, function(x) x@conceptRef), "\\n")`);
    const [flow, codes, freqs, dims] = out.trim().split('\n');
    expect(flow.trim()).toBe('SERIES TIDEGAUGE 1.0 DSD_SERIES');
    const catalogue = (await s.db('series').orderBy('code').select('code')).map((r) => r.code);
    expect(codes.trim().split(' ')).toEqual(catalogue);
    expect(freqs.trim()).toBe('A Q M');
    expect(dims.trim()).toBe('FREQ SERIES_CODE');
  });

  it('reads the latest vintages of two series, values as stored', async () => {
    const out = await rsdmx(`write.table(as.data.frame(readSDMX("${base}/data/TIDEGAUGE,SERIES,1.0/Q+M.EST_GDP_REAL+EST_UNEMP", headers = h)), stdout(), sep = "\\t", quote = FALSE, row.names = FALSE)`);
    const rows = frame(out);
    expect(new Set(rows.map((r) => r.SERIES_CODE))).toEqual(new Set(['EST_GDP_REAL', 'EST_UNEMP']));
    for (const [code, freq] of [['EST_GDP_REAL', 'Q'], ['EST_UNEMP', 'M']]) {
      const mine = rows.filter((r) => r.SERIES_CODE === code);
      const v = await stored(code);
      expect(mine.map((r) => r.TIME_PERIOD)).toEqual(v.periods);
      expect(mine.map((r) => (r.OBS_VALUE === 'NA' ? null : Number(r.OBS_VALUE)))).toEqual(v.values);
      expect(new Set(mine.map((r) => `${r.VINTAGE} ${r.AS_OF} ${r.FREQ}`))).toEqual(new Set([`${v.number} ${v.asOf} ${freq}`]));
    }
  });

  it('reads a past vintage by asOf, within a period window', async () => {
    const vintages = await s.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'EST_GDP_REAL').orderBy('v.number').select('v.number', 'v.as_of');
    expect(vintages.length).toBeGreaterThanOrEqual(3);
    const second = new Date(vintages[1].as_of).toISOString().slice(0, 10);
    const out = await rsdmx(`write.table(as.data.frame(readSDMX("${base}/data/SERIES/Q.EST_GDP_REAL?asOf=${second}&startPeriod=2015-Q1&endPeriod=2019", headers = h)), stdout(), sep = "\\t", quote = FALSE, row.names = FALSE)`);
    const rows = frame(out);
    const v = await stored('EST_GDP_REAL', { asOf: second });
    expect(v.number).toBe(vintages[1].number);
    const window = v.periods.map((p, i) => [p, v.values[i]] as const).filter(([p]) => p >= '2015-Q1' && p <= '2019-Q4');
    expect(rows.map((r) => [r.TIME_PERIOD, Number(r.OBS_VALUE)])).toEqual(window);
    expect(rows.every((r) => r.VINTAGE === String(v.number))).toBe(true);
    expect(window[0][0]).toBe('2015-Q1');
    expect(window.at(-1)![0]).toBe('2019-Q4');
  });
});

describe('SDMX out over HTTP', () => {
  const auth = () => ({ Authorization: `Bearer ${token}` });

  it('answers SDMX-CSV by Accept or format, the same rows either way', async () => {
    const byAccept = await fetch(`${base}/data/SERIES/A.EST_POP`, { headers: { ...auth(), Accept: 'application/vnd.sdmx.data+csv;version=1.0.0' } });
    expect(byAccept.headers.get('content-type')).toMatch(/^application\/vnd\.sdmx\.data\+csv/);
    const text = await byAccept.text();
    expect(text).toBe(await (await fetch(`${base}/data/SERIES/A.EST_POP?format=csv`, { headers: auth() })).text());
    const script = `import sys, csv, io, json\nprint(json.dumps([[r['TIME_PERIOD'], float(r['OBS_VALUE']) if r['OBS_VALUE'] else None, r['VINTAGE']] for r in csv.DictReader(io.StringIO(sys.stdin.read()))]))`;
    const child = execFile('/usr/bin/python3', ['-c', script]);
    child.stdin!.end(text);
    let out = '';
    child.stdout!.on('data', (d) => (out += d));
    await new Promise((r) => child.on('close', r));
    const rows = JSON.parse(out) as [string, number | null, string][];
    const v = await stored('EST_POP');
    expect(rows.map((r) => r[0])).toEqual(v.periods);
    expect(rows.map((r) => r[1])).toEqual(v.values);
    expect(new Set(rows.map((r) => r[2]))).toEqual(new Set([String(v.number)]));
    expect(text.split('\r\n')[0]).toBe('DATAFLOW,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE,UNIT_MEASURE,VINTAGE,AS_OF');
  });

  it('keeps updatedAfter, and refuses bad queries with what to fix', async () => {
    const past = await fetch(`${base}/data/SERIES/all?updatedAfter=2000-01-01T00:00:00Z&format=csv`, { headers: auth() });
    expect(past.status).toBe(200);
    const codes = new Set((await past.text()).trim().split('\r\n').slice(1).map((l) => l.split(',')[2]));
    expect(codes.size).toBe(Number((await s.db('series').whereExists(s.db('vintages').whereRaw('vintages.series_id = series.id')).count({ n: '*' }))[0].n));
    const future = await fetch(`${base}/data/SERIES/all?updatedAfter=2999-01-01T00:00:00Z`, { headers: auth() });
    expect(future.status).toBe(404);
    expect((await future.json()).error.code).toBe('no_results');
    const bad = await fetch(`${base}/data/SERIES/all?startPeriod=2020Q5`, { headers: auth() });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.message).toMatch(/startPeriod is an SDMX period such as 2020, 2020-Q1 or 2020-01/);
    const asOf = await fetch(`${base}/data/SERIES/all?asOf=yesterday`, { headers: auth() });
    expect((await asOf.json()).error.code).toBe('invalid_as_of');
    const before = await fetch(`${base}/data/SERIES/Q.EST_GDP_REAL?asOf=1990-01-01`, { headers: auth() });
    expect(before.status).toBe(404);
    expect((await fetch(`${base}/data/OTHER/all`, { headers: auth() })).status).toBe(404);
    expect((await fetch(`${base}/dataflow`)).status).toBe(401);
  });
});

describe('a feed reads our own SDMX out', () => {
  it('stores the vintage our SDMX out serves, from SDMX-ML and from SDMX-CSV, with the token as a header', async () => {
    for (const code of ['GDP_COPY_XML', 'GDP_COPY_CSV']) {
      await steward.post('/api/v1/series').send({ code, title: `Copy of real GDP (${code}, invented)`, frequency: 'Q', unit: 'EST$ million, chained 2020 prices', seasonalAdjustment: 'sa', source: 'Tidegauge SDMX out' }).expect(201);
    }
    const feeds = [
      { name: 'Ourselves, SDMX-ML', url: `${base}/data/TIDEGAUGE,SERIES,1.0/Q.EST_GDP_REAL?format=structurespecificdata`, mappings: [{ key: 'Q.EST_GDP_REAL', series: 'GDP_COPY_XML' }] },
      { name: 'Ourselves, SDMX-CSV', url: `${base}/data/SERIES/Q.EST_GDP_REAL`, mappings: [{ key: 'Q.EST_GDP_REAL', series: 'GDP_COPY_CSV' }] },
    ];
    const v = await stored('EST_GDP_REAL');
    for (const f of feeds) {
      const feed = await steward.post('/api/v1/feeds').send({ ...f, headers: [{ name: 'Authorization', value: `Bearer ${token}` }] }).expect(201);
      const run = await steward.post(`/api/v1/feeds/${feed.body.id}/run`).expect(200);
      expect(run.body.outcome, JSON.stringify(run.body)).toBe('stored');
      const copy = await stored(f.mappings[0].series, { number: 1 });
      expect(copy.periods).toEqual(v.periods);
      expect(copy.values).toEqual(v.values);
    }
  });
});
