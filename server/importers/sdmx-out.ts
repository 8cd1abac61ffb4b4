/**
 * SDMX data messages out: SDMX-CSV (version 1, the form SDMX 2.1 services answer) and SDMX-ML 2.1
 * structure-specific data. Both the SDMX REST routes (`/api/v1/sdmx/…`) and the local fake SDMX
 * source of development and tests write with these, so what a feed reads is what the standard's
 * services send. CSV rows go through `csvLine` (importers/export.ts); XML text through `xmlText`.
 */
import { csvLine } from './export.js';

/** A maintainable artefact's reference: agency, id and version (`TIDEGAUGE:SERIES(1.0)`). */
export interface SdmxRef {
  agency: string;
  id: string;
  version: string;
}

export interface SdmxSeriesOut {
  /** Dimension values, one per id of `dimensions` (in the data structure's order). */
  key: string[];
  /** Series-level attributes (for example UNIT_MEASURE). */
  attributes?: Record<string, string>;
  periods: string[];
  values: (number | null)[];
}

export interface SdmxDataMessage {
  /** The dataflow the data belongs to (SDMX-CSV's DATAFLOW column). */
  flow: SdmxRef;
  /** The data structure (SDMX-ML's structure reference). */
  structure: SdmxRef;
  /** Dimension ids except the time dimension, in order. */
  dimensions: string[];
  series: SdmxSeriesOut[];
  sender: string;
  prepared?: Date;
}

export const SDMX_MEDIA = {
  csv: 'application/vnd.sdmx.data+csv; version=1.0.0; charset=utf-8',
  structureSpecific: 'application/vnd.sdmx.structurespecificdata+xml; version=2.1; charset=utf-8',
  structure: 'application/vnd.sdmx.structure+xml; version=2.1; charset=utf-8',
} as const;

export const NS = {
  message: 'http://www.sdmx.org/resources/sdmxml/schemas/v2_1/message',
  common: 'http://www.sdmx.org/resources/sdmxml/schemas/v2_1/common',
  structure: 'http://www.sdmx.org/resources/sdmxml/schemas/v2_1/structure',
  ss: 'http://www.sdmx.org/resources/sdmxml/schemas/v2_1/data/structurespecific',
  xsi: 'http://www.w3.org/2001/XMLSchema-instance',
} as const;

/** Text for an XML attribute or element: the five special characters escaped, control characters dropped. */
export function xmlText(value: string | number): string {
  return String(value)
    .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f]/g, '')
    .replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!);
}

export const refText = (r: SdmxRef) => `${r.agency}:${r.id}(${r.version})`;

/** The SDMX-CSV answer: DATAFLOW, the dimensions, TIME_PERIOD, OBS_VALUE, then the attributes. */
export function writeSdmxCsv(message: SdmxDataMessage): string {
  const attributeIds = [...new Set(message.series.flatMap((s) => Object.keys(s.attributes ?? {})))];
  const lines = [csvLine(['DATAFLOW', ...message.dimensions, 'TIME_PERIOD', 'OBS_VALUE', ...attributeIds])];
  const flow = refText(message.flow);
  const kinds = ['text', ...message.dimensions.map(() => 'text' as const), 'text', 'number', ...attributeIds.map(() => 'text' as const)] as const;
  for (const s of message.series) {
    const attrs = attributeIds.map((a) => s.attributes?.[a] ?? '');
    for (let i = 0; i < s.periods.length; i++) lines.push(csvLine([flow, ...s.key, s.periods[i], s.values[i], ...attrs], kinds as never));
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** The message header both SDMX-ML messages share. */
export function messageHeader(sender: string, prepared: Date, structure?: { ref: SdmxRef; ns: string }): string {
  const id = `IREF${prepared.getTime()}`;
  const s = structure
    ? `<message:Structure structureID="${xmlText(structure.ref.id)}" namespace="${xmlText(structure.ns)}" dimensionAtObservation="TIME_PERIOD"><common:Structure><Ref agencyID="${xmlText(structure.ref.agency)}" id="${xmlText(structure.ref.id)}" version="${xmlText(structure.ref.version)}"/></common:Structure></message:Structure>`
    : '';
  return `<message:Header><message:ID>${id}</message:ID><message:Test>false</message:Test><message:Prepared>${prepared.toISOString().replace(/\.\d{3}Z$/, 'Z')}</message:Prepared><message:Sender id="${xmlText(sender)}"/>${s}</message:Header>`;
}

/** The SDMX-ML 2.1 structure-specific data answer (observations at TIME_PERIOD). */
export function writeStructureSpecific(message: SdmxDataMessage): string {
  const st = message.structure;
  const ns = `urn:sdmx:org.sdmx.infomodel.datastructure.DataStructure=${st.agency}:${st.id}(${st.version}):ObsLevelDim:TIME_PERIOD`;
  const out: string[] = [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<message:StructureSpecificData xmlns:message="${NS.message}" xmlns:common="${NS.common}" xmlns:ss="${NS.ss}" xmlns:xsi="${NS.xsi}" xmlns:ns1="${xmlText(ns)}">`,
    messageHeader(message.sender, message.prepared ?? new Date(), { ref: st, ns }),
    `<message:DataSet ss:dataScope="DataStructure" xsi:type="ns1:DataSetType" ss:structureRef="${xmlText(st.id)}" action="Information">`,
  ];
  for (const s of message.series) {
    let attrs = '';
    message.dimensions.forEach((d, i) => (attrs += ` ${d}="${xmlText(s.key[i])}"`));
    for (const [k, v] of Object.entries(s.attributes ?? {})) attrs += ` ${k}="${xmlText(v)}"`;
    out.push(`<Series${attrs}>`);
    for (let i = 0; i < s.periods.length; i++) {
      const v = s.values[i];
      out.push(`<Obs TIME_PERIOD="${xmlText(s.periods[i])}" OBS_VALUE="${v === null || !Number.isFinite(v) ? 'NaN' : String(v)}"/>`);
    }
    out.push('</Series>');
  }
  out.push('</message:DataSet>', '</message:StructureSpecificData>');
  return out.join('\n');
}

/** Which answer a request asks for: `format` first, then the Accept header (by quality, then order); SDMX-ML by default. */
export function chooseDataFormat(format: string | undefined, accept: string | undefined): 'csv' | 'xml' {
  const f = (format ?? '').toLowerCase();
  if (['csv', 'sdmx-csv', 'csvfile', 'sdmxcsv'].includes(f)) return 'csv';
  if (['xml', 'sdmx-ml', 'structurespecificdata', 'structurespecific'].includes(f)) return 'xml';
  const ranges = (accept ?? '')
    .split(',')
    .map((part, i) => {
      const [type, ...params] = part.trim().toLowerCase().split(';');
      const q = params.map((p) => /^\s*q=([\d.]+)/.exec(p)?.[1]).find(Boolean);
      const kind = /csv/.test(type) ? 'csv' : /xml/.test(type) ? 'xml' : null;
      return { kind, q: q === undefined ? 1 : Number(q), i };
    })
    .filter((r): r is { kind: 'csv' | 'xml'; q: number; i: number } => r.kind !== null && r.q > 0)
    .sort((a, b) => b.q - a.q || a.i - b.i);
  return ranges[0]?.kind ?? 'xml';
}
