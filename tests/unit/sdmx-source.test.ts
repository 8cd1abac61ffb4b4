/**
 * The local fake SDMX source: what it answers is read back by a parser outside the project
 * (Python's xml.etree and csv modules, Debian's /usr/bin/python3) and by our own readers, values
 * for values; a new release adds a period and revises the latest values; faults and a required
 * header behave as a real service's.
 */
import { execFileSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readSdmxMl } from '../../server/importers/sdmx-ml.js';
import { splitSeries } from '../../server/importers/observations.js';
import { readTable } from '../../server/importers/table.js';
import { FAKE_SERIES, fakeRelease } from '../../server/sdmx/fake-data.js';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';

let source: FakeSdmxSource;
beforeAll(async () => {
  source = await startFakeSdmxSource(0);
});
afterAll(() => source.close());

const flow = 'EST_STATS,NA_MAIN,1.0';
const get = (path: string, headers: Record<string, string> = {}) => fetch(`${source.url}${path}`, { headers });

/** Python reads an SDMX-ML structure-specific message: {key: [[period, value], …]}. */
function pythonReadsXml(xml: string): Record<string, [string, number | null][]> {
  const script = `
import sys, json, xml.etree.ElementTree as ET
root = ET.fromstring(sys.stdin.read())
out = {}
for s in root.iter('Series'):
    key = '.'.join(s.get(d) for d in ('FREQ', 'REF_AREA', 'INDICATOR'))
    out[key] = [[o.get('TIME_PERIOD'), None if o.get('OBS_VALUE') == 'NaN' else float(o.get('OBS_VALUE'))] for o in s.iter('Obs')]
print(json.dumps(out))`;
  return JSON.parse(execFileSync('/usr/bin/python3', ['-c', script], { input: xml, encoding: 'utf8' }));
}

function pythonReadsCsv(csv: string): Record<string, [string, number | null][]> {
  const script = `
import sys, json, csv, io
out = {}
for r in csv.DictReader(io.StringIO(sys.stdin.read())):
    key = '.'.join(r[d] for d in ('FREQ', 'REF_AREA', 'INDICATOR'))
    out.setdefault(key, []).append([r['TIME_PERIOD'], float(r['OBS_VALUE']) if r['OBS_VALUE'] else None])
print(json.dumps(out))`;
  return JSON.parse(execFileSync('/usr/bin/python3', ['-c', script], { input: csv, encoding: 'utf8' }));
}

describe('the local fake SDMX source', () => {
  it('answers SDMX-ML 2.1 structure-specific data that a parser outside the project reads, value for value', async () => {
    const res = await get(`/data/${flow}/Q.EST.GDP_VOL+HOURS`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/structurespecificdata\+xml/);
    const read = pythonReadsXml(await res.text());
    expect(Object.keys(read).sort()).toEqual(['Q.EST.GDP_VOL', 'Q.EST.HOURS']);
    const gdp = fakeRelease(FAKE_SERIES[0], 1);
    expect(read['Q.EST.GDP_VOL'].map((r) => r[0])).toEqual(gdp.periods);
    expect(read['Q.EST.GDP_VOL'].map((r) => r[1])).toEqual(gdp.values);
    expect(gdp.periods[0]).toBe('2005-Q1');
    expect(gdp.periods).toHaveLength(76);
  });

  it('answers SDMX-CSV by Accept or format, and our readers give the same series as Python', async () => {
    const byAccept = await (await get(`/data/${flow}/M.EST.RETAIL_VOL`, { Accept: 'application/vnd.sdmx.data+csv;version=1.0.0' })).text();
    const byFormat = await (await get(`/data/${flow}/M.EST.RETAIL_VOL?format=csv`)).text();
    expect(byAccept).toBe(byFormat);
    expect(byAccept.split('\r\n')[0]).toBe('DATAFLOW,FREQ,REF_AREA,INDICATOR,TIME_PERIOD,OBS_VALUE,UNIT_MEASURE,TITLE');
    const python = pythonReadsCsv(byAccept)['M.EST.RETAIL_VOL'];
    const groups = splitSeries(await readTable(Buffer.from(byAccept), 'answer.csv'));
    expect(groups.map((g) => g.key)).toEqual(['M.EST.RETAIL_VOL']);
    expect(groups[0].periods).toEqual(python.map((r) => r[0]));
    expect(groups[0].values.map(Number)).toEqual(python.map((r) => r[1]));

    const xml = await (await get(`/data/${flow}/M.EST.RETAIL_VOL`)).text();
    const fromXml = readSdmxMl(Buffer.from(xml));
    expect(fromXml.map((g) => g.key)).toEqual(['M.EST.RETAIL_VOL']);
    expect(fromXml[0].periods).toEqual(groups[0].periods);
    expect(fromXml[0].values).toEqual(groups[0].values);
    expect([...fromXml[0].units.keys()]).toEqual(['index 2015=100']);
    expect([...fromXml[0].freqs.keys()]).toEqual(['M']);
  });

  it('our SDMX-ML reader reads generic data too, and refuses a document type or a message that is not data', () => {
    const generic = `<?xml version="1.0"?><message:GenericData xmlns:message="${'http://www.sdmx.org/resources/sdmxml/schemas/v2_1/message'}" xmlns:generic="http://www.sdmx.org/resources/sdmxml/schemas/v2_1/data/generic"><message:DataSet><generic:Series><generic:SeriesKey><generic:Value id="FREQ" value="A"/><generic:Value id="REF_AREA" value="EST"/></generic:SeriesKey><generic:Attributes><generic:Value id="UNIT_MEASURE" value="persons"/></generic:Attributes><generic:Obs><generic:ObsDimension value="2020"/><generic:ObsValue value="1.5"/></generic:Obs><generic:Obs><generic:ObsDimension value="2021"/><generic:ObsValue value="NaN"/></generic:Obs></generic:Series></message:DataSet></message:GenericData>`;
    const [g] = readSdmxMl(Buffer.from(generic));
    expect(g.key).toBe('A.EST');
    expect(g.periods).toEqual(['2020', '2021']);
    expect(g.values).toEqual(['1.5', '']);
    expect([...g.units.keys()]).toEqual(['persons']);
    const bomb = '<?xml version="1.0"?><!DOCTYPE x [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">]><message:StructureSpecificData>&b;</message:StructureSpecificData>';
    expect(() => readSdmxMl(Buffer.from(bomb))).toThrow(/document type/);
    expect(() => readSdmxMl(Buffer.from('<message:Structure xmlns:message="m"/>'))).toThrow(/root element is Structure/);
    expect(() => readSdmxMl(Buffer.from('<a><b></a>'))).toThrow(/not well-formed XML/);
  });

  it('keeps a period window and refuses an unknown flow or key as an SDMX service does', async () => {
    const csv = await (await get(`/data/${flow}/Q.EST.HOURS?format=csv&startPeriod=2010-Q1&endPeriod=2010`)).text();
    expect(pythonReadsCsv(csv)['Q.EST.HOURS'].map((r) => r[0])).toEqual(['2010-Q1', '2010-Q2', '2010-Q3', '2010-Q4']);
    expect((await get(`/data/${flow}/Q.EST.NOTHING`)).status).toBe(404);
    expect((await get('/data/OTHER/all')).status).toBe(404);
  });

  it('publishes a new release on demand: one more period, the latest values revised, old ones kept', async () => {
    const before = pythonReadsXml(await (await get(`/data/${flow}/Q.EST.GDP_VOL`)).text())['Q.EST.GDP_VOL'];
    const res = await fetch(`${source.url}/release`, { method: 'POST' });
    expect(await res.json()).toEqual({ release: 2 });
    const after = pythonReadsXml(await (await get(`/data/${flow}/Q.EST.GDP_VOL`)).text())['Q.EST.GDP_VOL'];
    expect(after).toHaveLength(before.length + 1);
    expect(after.at(-1)![0]).toBe('2024-Q1');
    expect(after.slice(0, 40)).toEqual(before.slice(0, 40));
    const revised = before.filter((b, i) => after[i][1] !== b[1]);
    expect(revised.length).toBeGreaterThan(0);
    expect(revised.every(([p]) => p >= '2022')).toBe(true);
  });

  it('asks for a header when told to, and misbehaves on purpose for tests', async () => {
    source.requireHeader('X-Api-Key', 'k1');
    expect((await get(`/data/${flow}/all`)).status).toBe(401);
    expect((await get(`/data/${flow}/all`, { 'X-Api-Key': 'k1' })).status).toBe(200);
    source.requireHeader(null);
    source.setFault({ kind: 'unavailable' });
    expect((await get(`/data/${flow}/all`)).status).toBe(503);
    source.setFault({ kind: 'bad-value', key: 'Q.EST.HOURS' });
    const text = await (await get(`/data/${flow}/all?format=csv`)).text();
    const bad = text.split('\r\n').filter((l) => l.includes('n/a'));
    expect(bad).toHaveLength(1);
    expect(bad[0]).toMatch(/^EST_STATS:NA_MAIN\(1\.0\),Q,EST,HOURS,/);
    source.setFault(null);
    expect(source.requests().some((r) => r.headers['x-api-key'] === 'k1')).toBe(true);
  });
});
