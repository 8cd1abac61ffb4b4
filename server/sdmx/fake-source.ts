/**
 * The local fake SDMX REST source for development, tests and the demo (never production), as the
 * fake mail server is for mail: a real HTTP server on 127.0.0.1 answering the standard's data
 * query `GET /rest/data/{flow}/{key}` with the invented series of sdmx/fake-data.ts, as SDMX-CSV
 * or SDMX-ML 2.1 structure-specific data (by `format` or the Accept header, as real services do).
 * `POST /rest/release` (or `publish()`) publishes a new release. Nothing in Tidegauge knows it is
 * a fake: a feed reads it through its URL like any other source.
 *
 * For tests it can ask for a header (`requireHeader`), and misbehave on purpose (`setFault`):
 * answer 503, send a value that is not a number, or answer slowly.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { chooseDataFormat, SDMX_MEDIA, writeSdmxCsv, writeStructureSpecific, xmlText, type SdmxSeriesOut } from '../importers/sdmx-out.js';
import { FAKE_DIMENSIONS, FAKE_FLOW, FAKE_SERIES, FAKE_STRUCTURE, fakeRelease } from './fake-data.js';
import { periodWindow, selectByKey } from './query.js';

export type FakeSdmxFault = null | { kind: 'unavailable' } | { kind: 'bad-value'; key: string } | { kind: 'slow'; ms: number };

export interface FakeSdmxSource {
  port: number;
  /** The base of the data query: `${url}/data/{flow}/{key}`. */
  url: string;
  release(): number;
  /** Publishes the next release; resolves with its number. */
  publish(): number;
  setFault(fault: FakeSdmxFault): void;
  requireHeader(name: string | null, value?: string): void;
  /** The requests answered so far (method, path with query, headers as received). */
  requests(): { method: string; url: string; headers: Record<string, string | string[] | undefined> }[];
  close(): Promise<void>;
}

function sdmxError(res: ServerResponse, status: number, code: number, text: string) {
  res.writeHead(status, { 'Content-Type': 'application/xml; charset=utf-8' });
  res.end(`<?xml version="1.0" encoding="UTF-8"?>\n<message:Error xmlns:message="http://www.sdmx.org/resources/sdmxml/schemas/v2_1/message"><message:ErrorMessage code="${code}"><common:Text xmlns:common="http://www.sdmx.org/resources/sdmxml/schemas/v2_1/common">${xmlText(text)}</common:Text></message:ErrorMessage></message:Error>`);
}

const HELP = `Tidegauge's local fake SDMX source (development and tests only; invented data).
GET  /rest/data/${FAKE_FLOW.agency},${FAKE_FLOW.id},${FAKE_FLOW.version}/{key}?startPeriod=&endPeriod=&format=csv|xml
     keys: ${FAKE_SERIES.map((s) => s.key.join('.')).join(', ')}
POST /rest/release   publishes a new release
`;

export async function startFakeSdmxSource(port = 0, host = '127.0.0.1'): Promise<FakeSdmxSource> {
  let release = 1;
  let fault: FakeSdmxFault = null;
  let required: { name: string; value?: string } | null = null;
  const log: { method: string; url: string; headers: Record<string, string | string[] | undefined> }[] = [];

  const handle = async (req: IncomingMessage, res: ServerResponse) => {
    const url = new URL(req.url ?? '/', 'http://fake');
    log.push({ method: req.method ?? 'GET', url: url.pathname + url.search, headers: { ...req.headers } });
    if (log.length > 1000) log.shift();
    if (req.method === 'POST' && /^\/(rest\/)?release\/?$/.test(url.pathname)) {
      release++;
      res.writeHead(200, { 'Content-Type': 'application/json' });
      return res.end(JSON.stringify({ release }));
    }
    if (req.method !== 'GET' && req.method !== 'HEAD') return sdmxError(res, 405, 405, 'Only GET is answered here (POST /rest/release publishes).');
    if (url.pathname === '/' || url.pathname === '/rest' || url.pathname === '/rest/') {
      res.writeHead(200, { 'Content-Type': 'text/plain; charset=utf-8' });
      return res.end(HELP);
    }
    const m = /^\/rest\/data\/([^/]+)(?:\/([^/]*))?(?:\/[^/]*)?\/?$/.exec(url.pathname);
    if (!m) return sdmxError(res, 404, 404, `No such resource: ${url.pathname}. ${HELP}`);
    if (required) {
      const got = req.headers[required.name.toLowerCase()];
      if (!got || (required.value !== undefined && got !== required.value)) return sdmxError(res, 401, 401, `This source needs the header ${required.name}.`);
    }
    if (fault?.kind === 'unavailable') return sdmxError(res, 503, 503, 'The source is down for maintenance (a fault asked for by a test).');
    if (fault?.kind === 'slow') await new Promise((r) => setTimeout(r, fault && fault.kind === 'slow' ? fault.ms : 0));
    const flow = decodeURIComponent(m[1]).split(',');
    const flowId = flow.length >= 2 ? flow[1] : flow[0];
    if (flowId.toUpperCase() !== FAKE_FLOW.id) return sdmxError(res, 404, 100, `No dataflow ${flowId}; this source has ${FAKE_FLOW.id}.`);
    const chosen = selectByKey(FAKE_SERIES, (s) => s.key, m[2] ? decodeURIComponent(m[2]) : undefined);
    const startPeriod = url.searchParams.get('startPeriod') ?? undefined;
    const endPeriod = url.searchParams.get('endPeriod') ?? undefined;
    const BAD = -987654.321;
    const series: SdmxSeriesOut[] = chosen
      .map((s) => {
        const r = fakeRelease(s, release);
        const w = periodWindow(r.periods, r.values, startPeriod, endPeriod);
        const values: (number | null)[] = [...w.values];
        // A fault: the faulty series' last value becomes text that is not a number.
        if (fault?.kind === 'bad-value' && fault.key === s.key.join('.') && values.length) values[values.length - 1] = BAD;
        return { key: s.key, attributes: { UNIT_MEASURE: s.unit, TITLE: s.title }, periods: w.periods, values };
      })
      .filter((s) => s.periods.length > 0);
    if (!series.length) return sdmxError(res, 404, 100, 'No results found for this key and period window.');
    const format = chooseDataFormat(url.searchParams.get('format') ?? undefined, req.headers.accept);
    const message = { flow: FAKE_FLOW, structure: FAKE_STRUCTURE, dimensions: FAKE_DIMENSIONS, series, sender: 'EST_STATS', prepared: new Date() };
    const body = (format === 'csv' ? writeSdmxCsv(message) : writeStructureSpecific(message)).replaceAll(String(BAD), 'n/a');
    res.writeHead(200, { 'Content-Type': format === 'csv' ? SDMX_MEDIA.csv : SDMX_MEDIA.structureSpecific });
    res.end(req.method === 'HEAD' ? undefined : body);
  };

  const server = createServer((req, res) => {
    handle(req, res).catch((error) => {
      if (!res.headersSent) sdmxError(res, 500, 500, String((error as Error).message));
      else res.destroy();
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  server.on('error', () => {});
  const actual = (server.address() as AddressInfo).port;
  return {
    port: actual,
    url: `http://${host}:${actual}/rest`,
    release: () => release,
    publish: () => ++release,
    setFault: (f) => void (fault = f),
    requireHeader: (name, value) => void (required = name ? { name, value } : null),
    requests: () => [...log],
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

/** The fake source as the app starts it: on `port`, or on a free port when another program holds it. */
export async function startLocalSdmxSource(port: number): Promise<{ source: FakeSdmxSource; moved: boolean }> {
  try {
    return { source: await startFakeSdmxSource(port), moved: false };
  } catch (error) {
    if ((error as { code?: string }).code !== 'EADDRINUSE' || port === 0) throw error;
    return { source: await startFakeSdmxSource(0), moved: true };
  }
}
