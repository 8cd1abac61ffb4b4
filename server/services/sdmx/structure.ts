/**
 * Our series as one SDMX dataflow, `TIDEGAUGE:SERIES(1.0)` (the name the SDMX-CSV download of a
 * vintage already carries), and its data structure: dimensions FREQ and SERIES_CODE (the series'
 * code), time dimension TIME_PERIOD, primary measure OBS_VALUE, series attributes UNIT_MEASURE,
 * VINTAGE (the vintage's number) and AS_OF (its release date). The structure messages are SDMX-ML
 * 2.1 (`message:Structure`), with the codelists (frequencies; every series code with its title)
 * and the concepts.
 */
import { messageHeader, NS, xmlText, type SdmxRef } from '../../importers/sdmx-out.js';
import { FREQUENCIES, FREQUENCY_LABELS } from '../../schemas/frequency.js';

export const AGENCY = 'TIDEGAUGE';
export const FLOW: SdmxRef = { agency: AGENCY, id: 'SERIES', version: '1.0' };
export const DSD: SdmxRef = { agency: AGENCY, id: 'DSD_SERIES', version: '1.0' };
export const DIMENSIONS = ['FREQ', 'SERIES_CODE'];
const CONCEPTS: SdmxRef = { agency: AGENCY, id: 'CS_SERIES', version: '1.0' };

const CONCEPT_NAMES: Record<string, string> = {
  FREQ: 'Frequency',
  SERIES_CODE: 'Series code',
  TIME_PERIOD: 'Time period',
  OBS_VALUE: 'Observation value',
  UNIT_MEASURE: 'Unit of measure',
  VINTAGE: 'Vintage number',
  AS_OF: 'Release date of the vintage',
};

const urn = (pkg: string, cls: string, r: SdmxRef) => `urn:sdmx:org.sdmx.infomodel.${pkg}.${cls}=${r.agency}:${r.id}(${r.version})`;
const name = (text: string) => `<common:Name xml:lang="en">${xmlText(text)}</common:Name>`;
const maintainable = (tag: string, r: SdmxRef, u: string) => `<structure:${tag} id="${xmlText(r.id)}" agencyID="${xmlText(r.agency)}" version="${xmlText(r.version)}" isFinal="true" urn="${xmlText(u)}">`;

function structureMessage(body: string, prepared = new Date()): string {
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<message:Structure xmlns:message="${NS.message}" xmlns:structure="${NS.structure}" xmlns:common="${NS.common}">`,
    messageHeader(AGENCY, prepared),
    '<message:Structures>',
    body,
    '</message:Structures>',
    '</message:Structure>',
  ].join('\n');
}

const dataflowXml = () =>
  `${maintainable('Dataflow', FLOW, urn('datastructure', 'Dataflow', FLOW))}${name('Tidegauge series: every vintage of every series in the Catalogue')}<structure:Structure><Ref agencyID="${DSD.agency}" id="${DSD.id}" version="${DSD.version}" package="datastructure" class="DataStructure"/></structure:Structure></structure:Dataflow>`;

/** Whether an artefact query (agency, id, version, each possibly "all" or absent) names ours. */
export function matchesRef(r: SdmxRef, agency?: string, id?: string, version?: string): boolean {
  const ok = (want: string | undefined, have: string) => !want || want === 'all' || want === '*' || want.toUpperCase() === have.toUpperCase() || (want === 'latest' && have === r.version);
  return ok(agency, r.agency) && ok(id, r.id) && ok(version, r.version);
}

/** The dataflow structure message. */
export function dataflowMessage(): string {
  return structureMessage(`<structure:Dataflows>${dataflowXml()}</structure:Dataflows>`);
}

const conceptRef = (id: string) => `<structure:ConceptIdentity><Ref id="${id}" maintainableParentID="${CONCEPTS.id}" maintainableParentVersion="${CONCEPTS.version}" agencyID="${AGENCY}" package="conceptscheme" class="Concept"/></structure:ConceptIdentity>`;
const enumeration = (codelist: string) => `<structure:LocalRepresentation><structure:Enumeration><Ref id="${codelist}" version="1.0" agencyID="${AGENCY}" package="codelist" class="Codelist"/></structure:Enumeration></structure:LocalRepresentation>`;
const seriesLevel = `<structure:AttributeRelationship>${DIMENSIONS.map((d) => `<structure:Dimension><Ref id="${d}"/></structure:Dimension>`).join('')}</structure:AttributeRelationship>`;

/** The data structure message: codelists, concepts and the data structure (with the dataflow). */
export function dataStructureMessage(series: { code: string; title: string }[]): string {
  const cl = (id: string) => ({ agency: AGENCY, id, version: '1.0' });
  const codelist = (id: string, title: string, codes: { id: string; name: string }[]) =>
    `${maintainable('Codelist', cl(id), urn('codelist', 'Codelist', cl(id)))}${name(title)}${codes.map((c) => `<structure:Code id="${xmlText(c.id)}" urn="${xmlText(`urn:sdmx:org.sdmx.infomodel.codelist.Code=${AGENCY}:${id}(1.0).${c.id}`)}">${name(c.name)}</structure:Code>`).join('')}</structure:Codelist>`;
  const codelists = [
    codelist('CL_FREQ', 'Frequency', FREQUENCIES.map((f) => ({ id: f, name: FREQUENCY_LABELS[f] }))),
    codelist('CL_SERIES_CODE', 'Series of the Catalogue', series.map((s) => ({ id: s.code, name: s.title }))),
  ];
  const concepts = `${maintainable('ConceptScheme', CONCEPTS, urn('conceptscheme', 'ConceptScheme', CONCEPTS))}${name('Tidegauge concepts')}${Object.entries(CONCEPT_NAMES)
    .map(([id, n]) => `<structure:Concept id="${id}" urn="${xmlText(`urn:sdmx:org.sdmx.infomodel.conceptscheme.Concept=${AGENCY}:${CONCEPTS.id}(1.0).${id}`)}">${name(n)}</structure:Concept>`)
    .join('')}</structure:ConceptScheme>`;
  const dims = DIMENSIONS.map((d, i) => `<structure:Dimension id="${d}" position="${i + 1}">${conceptRef(d)}${enumeration(d === 'FREQ' ? 'CL_FREQ' : 'CL_SERIES_CODE')}</structure:Dimension>`).join('');
  const time = `<structure:TimeDimension id="TIME_PERIOD" position="${DIMENSIONS.length + 1}">${conceptRef('TIME_PERIOD')}<structure:LocalRepresentation><structure:TextFormat textType="ObservationalTimePeriod"/></structure:LocalRepresentation></structure:TimeDimension>`;
  const attrs = ['UNIT_MEASURE', 'VINTAGE', 'AS_OF'].map((a) => `<structure:Attribute id="${a}" assignmentStatus="Mandatory">${conceptRef(a)}${seriesLevel}</structure:Attribute>`).join('');
  const dsd = `${maintainable('DataStructure', DSD, urn('datastructure', 'DataStructure', DSD))}${name('Tidegauge series')}<structure:DataStructureComponents><structure:DimensionList id="DimensionDescriptor">${dims}${time}</structure:DimensionList><structure:AttributeList id="AttributeDescriptor">${attrs}</structure:AttributeList><structure:MeasureList id="MeasureDescriptor"><structure:PrimaryMeasure id="OBS_VALUE">${conceptRef('OBS_VALUE')}</structure:PrimaryMeasure></structure:MeasureList></structure:DataStructureComponents></structure:DataStructure>`;
  return structureMessage(
    `<structure:Dataflows>${dataflowXml()}</structure:Dataflows><structure:Codelists>${codelists.join('')}</structure:Codelists><structure:Concepts>${concepts}</structure:Concepts><structure:DataStructures>${dsd}</structure:DataStructures>`,
  );
}
