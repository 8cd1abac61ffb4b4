/**
 * A feed's fetch: the SDMX REST data URL asked for SDMX-CSV or SDMX-ML 2.1 (the Accept header
 * every SDMX 2.1 service understands), the feed's own headers, a time limit and a size limit;
 * then the answer read into series (importers) and each series matched to the Catalogue series
 * the feed's mapping names. Nothing here is specific to any source.
 */
import { readSdmxMl, looksLikeXml } from '../../importers/sdmx-ml.js';
import { splitSeries, type SeriesRows } from '../../importers/observations.js';
import { readTable } from '../../importers/table.js';
import { HttpError } from '../../lib/errors.js';
import type { StoredFeed } from './registry.js';

export const FEED_ACCEPT = 'application/vnd.sdmx.data+csv;version=1.0.0, application/vnd.sdmx.structurespecificdata+xml;version=2.1;q=0.9, application/xml;q=0.5, text/csv;q=0.5';

/** Why a run failed, in a sentence a steward can act on. */
export class FeedFailure extends Error {}

export interface FetchedAnswer {
  format: 'sdmx-csv' | 'sdmx-ml';
  bytes: number;
  groups: SeriesRows[];
}

async function readLimited(res: Response, maxBytes: number): Promise<Buffer> {
  const declared = Number(res.headers.get('content-length') ?? 0);
  if (declared > maxBytes) throw new FeedFailure(`The source's answer is ${Math.round(declared / 1e6)} MB; at most ${Math.round(maxBytes / 1e6)} MB are read. Ask for fewer series or a shorter period.`);
  const chunks: Buffer[] = [];
  let total = 0;
  if (!res.body) return Buffer.alloc(0);
  for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
    total += chunk.length;
    if (total > maxBytes) throw new FeedFailure(`The source's answer is larger than ${Math.round(maxBytes / 1e6)} MB; ask for fewer series or a shorter period.`);
    chunks.push(Buffer.from(chunk));
  }
  return Buffer.concat(chunks);
}

/** Fetches the feed's URL and reads the answer into series. Throws FeedFailure with the reason. */
export async function fetchAnswer(feed: Pick<StoredFeed, 'url' | 'headers'>, { timeoutMs, maxBytes }: { timeoutMs: number; maxBytes: number }): Promise<FetchedAnswer> {
  const headers: Record<string, string> = { Accept: FEED_ACCEPT, 'User-Agent': 'Tidegauge feed' };
  for (const h of feed.headers) headers[h.name] = h.value;
  let res: Response;
  try {
    res = await fetch(feed.url, { headers, signal: AbortSignal.timeout(timeoutMs), redirect: 'follow' });
  } catch (error) {
    const e = error as Error & { cause?: { code?: string; message?: string } };
    if (e.name === 'TimeoutError') throw new FeedFailure(`The source did not answer within ${Math.round(timeoutMs / 1000)} seconds.`);
    throw new FeedFailure(`The source could not be reached (${e.cause?.code ?? e.cause?.message ?? e.message}). Check the address.`);
  }
  const buffer = await readLimited(res, maxBytes);
  if (!res.ok) {
    const text = buffer.toString('utf8');
    const said = /<(?:\w+:)?Text[^>]*>([^<]{1,300})</.exec(text)?.[1] ?? text.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ').trim().slice(0, 200);
    const hint = res.status === 401 || res.status === 403 ? ' Check the feed’s headers (an API key?).' : res.status === 404 ? ' Check the flow and key in the address (SDMX services answer 404 when nothing matches).' : '';
    throw new FeedFailure(`The source answered ${res.status} ${res.statusText}${said ? `: ${said}` : ''}.${hint}`);
  }
  const type = (res.headers.get('content-type') ?? '').toLowerCase();
  const xml = /xml/.test(type) || (!/csv/.test(type) && looksLikeXml(buffer));
  try {
    if (xml) return { format: 'sdmx-ml', bytes: buffer.length, groups: readSdmxMl(buffer) };
    const table = await readTable(buffer, 'answer.csv', 'sdmx-csv');
    return { format: 'sdmx-csv', bytes: buffer.length, groups: splitSeries(table) };
  } catch (error) {
    if (error instanceof HttpError) throw new FeedFailure(`The answer could not be read as ${xml ? 'SDMX-ML 2.1' : 'SDMX-CSV'}: ${error.message}`);
    throw error;
  }
}

/**
 * The group of the answer a mapping key names: its series key ("Q.EST.GDP_VOL"), its SERIES_CODE,
 * or both joined (an SDMX-CSV whose code column is a dimension, as Tidegauge's own SDMX out).
 */
export function findGroup(groups: SeriesRows[], key: string): SeriesRows | undefined {
  const k = key.toUpperCase();
  return groups.find((g) => g.key?.toUpperCase() === k || g.code?.toUpperCase() === k || (g.key && g.code && `${g.key}.${g.code}`.toUpperCase() === k));
}
