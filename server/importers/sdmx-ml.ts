/**
 * SDMX-ML 2.1 data messages in: structure-specific data (series dimensions and attributes as XML
 * attributes) and generic data (SeriesKey / ObsDimension / ObsValue elements). Each series becomes
 * the same `SeriesRows` a CSV or SDMX-CSV file gives (importers/observations.ts), so its
 * observations are checked exactly as a load's; an observation's "row" is its position in the
 * message (1, 2, …). fast-xml-parser reads the text and never resolves external entities.
 */
import { XMLParser } from 'fast-xml-parser';
import { unprocessable } from '../lib/errors.js';
import { MAX_KEY_DIMENSIONS, MAX_KEY_LENGTH, type SeriesRows } from './observations.js';
import { decodeText } from './table.js';

/** Series-level XML attributes that are SDMX attributes or message machinery, not key dimensions. */
// VINTAGE and AS_OF: the attributes of Tidegauge's own SDMX out (a vintage's number and release date).
const NOT_DIMENSIONS = new Set(['VINTAGE', 'AS_OF', 'UNIT_MEASURE', 'UNIT', 'UNIT_MULT', 'DECIMALS', 'TITLE', 'TITLE_COMPL', 'TIME_FORMAT', 'COLLECTION', 'BASE_PER', 'SOURCE_AGENCY', 'COMPILATION', 'COMMENT', 'OBS_STATUS', 'OBS_CONF', 'TYPE', 'ACTION', 'VALIDFROMDATE', 'VALIDTODATE']);
const MAX_SERIES = 100_000;

type Node = Record<string, unknown>;
const list = (v: unknown): Node[] => (v === undefined || v === null ? [] : Array.isArray(v) ? (v as Node[]) : [v as Node]);
const attr = (n: Node, name: string): string | undefined => {
  const v = n[`@_${name}`];
  return v === undefined ? undefined : String(v);
};
const attributesOf = (n: Node) => Object.keys(n).filter((k) => k.startsWith('@_')).map((k) => [k.slice(2), String(n[k])] as const);

/** Whether a text looks like an SDMX-ML data message (the feed reads it as XML, not CSV). */
export function looksLikeXml(buf: Buffer): boolean {
  return /^\s*</.test(buf.subarray(0, 512).toString('utf8').replace(/^\uFEFF/, ''));
}

function group(key: string, code: string | null): SeriesRows {
  if (key.length > MAX_KEY_LENGTH) throw unprocessable('key_too_long', `A series key is ${key.length} characters long; at most ${MAX_KEY_LENGTH} are accepted.`);
  return { key, code, rowNumbers: [], periods: [], values: [], freqs: new Map(), units: new Map(), periodColumn: 'TIME_PERIOD', valueColumn: 'OBS_VALUE' };
}

function tally(map: Map<string, { first: number; count: number }>, value: string | undefined, row: number) {
  if (!value) return;
  const hit = map.get(value);
  if (hit) hit.count++;
  else if (map.size < 50) map.set(value, { first: row, count: 1 });
}

/** NaN is SDMX-ML's "no value"; the load checks read an empty cell as missing. */
const valueText = (v: string | undefined) => (v === undefined || v.trim().toLowerCase() === 'nan' ? '' : v);

/** Reads the series of an SDMX-ML 2.1 data message (structure-specific or generic). */
export function readSdmxMl(buf: Buffer): SeriesRows[] {
  const text = decodeText(buf);
  // SDMX messages never declare a document type; one that does may define entities that expand.
  if (/<!DOCTYPE/i.test(text.slice(0, 65_536))) throw unprocessable('xml_doctype', 'The answer declares a document type (<!DOCTYPE>); SDMX-ML messages have none, so it is not read.');
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: '@_',
    removeNSPrefix: true,
    parseAttributeValue: false,
    parseTagValue: false,
    processEntities: true,
    isArray: (name) => ['DataSet', 'Series', 'Obs', 'Value'].includes(name),
  });
  let doc: Node;
  try {
    doc = parser.parse(text, true) as Node;
  } catch (error) {
    throw unprocessable('unreadable_xml', `The answer is not well-formed XML (${String((error as Error).message).slice(0, 160)}).`);
  }
  const rootName = Object.keys(doc).find((k) => !k.startsWith('?'));
  const root = rootName ? (doc[rootName] as Node) : undefined;
  if (!root || !['StructureSpecificData', 'GenericData', 'StructureSpecificTimeSeriesData', 'GenericTimeSeriesData'].includes(rootName!)) {
    const error = rootName === 'Error' ? ' (the source answered with an SDMX error message)' : '';
    throw unprocessable('not_sdmx_data', `The answer is not an SDMX-ML 2.1 data message: its root element is ${rootName ?? 'missing'}${error}.`);
  }
  const generic = rootName!.startsWith('Generic');
  const groups: SeriesRows[] = [];
  let row = 0;
  for (const ds of list(root.DataSet)) {
    for (const s of list(ds.Series)) {
      if (groups.length >= MAX_SERIES) throw unprocessable('too_many_series', `The answer carries more than ${MAX_SERIES} series.`);
      let dims: (readonly [string, string])[];
      let attrs: (readonly [string, string])[];
      if (generic) {
        dims = list((s.SeriesKey as Node | undefined)?.Value).map((v) => [attr(v, 'id') ?? '', attr(v, 'value') ?? ''] as const);
        attrs = list((s.Attributes as Node | undefined)?.Value).map((v) => [attr(v, 'id') ?? '', attr(v, 'value') ?? ''] as const);
      } else {
        const all = attributesOf(s);
        dims = all.filter(([k]) => !NOT_DIMENSIONS.has(k.toUpperCase()));
        attrs = all.filter(([k]) => NOT_DIMENSIONS.has(k.toUpperCase()));
      }
      if (dims.length > MAX_KEY_DIMENSIONS) throw unprocessable('key_too_deep', `A series key has ${dims.length} dimensions; at most ${MAX_KEY_DIMENSIONS} are accepted.`);
      const g = group(dims.map(([, v]) => v).join('.'), null);
      const freq = dims.find(([k]) => k.toUpperCase() === 'FREQ')?.[1];
      const unit = attrs.find(([k]) => ['UNIT_MEASURE', 'UNIT'].includes(k.toUpperCase()))?.[1];
      for (const o of list(s.Obs)) {
        row++;
        let period: string | undefined;
        let value: string | undefined;
        if (generic) {
          period = attr((o.ObsDimension as Node | undefined) ?? {}, 'value');
          value = attr((o.ObsValue as Node | undefined) ?? {}, 'value');
        } else {
          period = attr(o, 'TIME_PERIOD');
          value = attr(o, 'OBS_VALUE');
        }
        g.rowNumbers.push(row);
        g.periods.push(period ?? '');
        g.values.push(valueText(value));
        tally(g.freqs, freq, row);
        tally(g.units, unit, row);
      }
      groups.push(g);
    }
  }
  return groups;
}
