/**
 * Opens an XLSX workbook safely: the zip check first (importers/zip.ts: nothing is inflated before
 * it), then the parts that are named by a relationship but absent from the file are cut out,
 * then exceljs reads it. Workbooks from statistics offices sometimes keep references to a
 * drawing, a chart or a comment part that was removed; exceljs stops on those, and they never
 * hold cells, so they are dropped and the cells read regardless.
 */
import ExcelJS from 'exceljs';
import JSZip from 'jszip';
import { unprocessable } from '../lib/errors.js';
import { inspectZip } from './zip.js';

const RELATIONSHIP = /<Relationship\b[^>]*?\/>/g;
const attribute = (tag: string, name: string) => new RegExp(`\\b${name}="([^"]*)"`).exec(tag)?.[1];

/** The part a relationship target names, resolved against the folder of the part that names it. */
function resolveTarget(relsPath: string, target: string): string {
  if (target.startsWith('/')) return target.slice(1);
  // xl/worksheets/_rels/sheet1.xml.rels speaks for xl/worksheets/sheet1.xml
  const base = relsPath.replace(/_rels\/[^/]*$/, '').split('/').filter(Boolean);
  for (const step of target.split('/')) {
    if (step === '..') base.pop();
    else if (step !== '.' && step !== '') base.push(step);
  }
  return base.join('/');
}

/**
 * The workbook's bytes with every internal relationship whose target is missing removed, and
 * the elements that point at those relationships (`<drawing r:id=…/>`, `<legacyDrawing …/>`,
 * `<tablePart …/>`) removed from the part that holds them. Returns the bytes unchanged when
 * nothing dangles (the usual case) and how many references were dropped.
 */
export async function dropDanglingParts(buf: Buffer): Promise<{ buffer: Buffer; dropped: number }> {
  const zip = await JSZip.loadAsync(buf);
  let dropped = 0;
  for (const relsPath of Object.keys(zip.files).filter((p) => p.endsWith('.rels') && !zip.files[p].dir)) {
    const text = await zip.file(relsPath)!.async('string');
    const missing: string[] = [];
    const kept = text.replace(RELATIONSHIP, (tag) => {
      const target = attribute(tag, 'Target');
      if (!target || attribute(tag, 'TargetMode') === 'External') return tag;
      if (zip.file(resolveTarget(relsPath, decodeURIComponent(target)))) return tag;
      missing.push(attribute(tag, 'Id') ?? '');
      return '';
    });
    if (!missing.length) continue;
    dropped += missing.length;
    zip.file(relsPath, kept);
    const owner = relsPath.replace(/_rels\/([^/]*)\.rels$/, '$1');
    const part = zip.file(owner);
    if (!part) continue;
    let xml = await part.async('string');
    for (const id of missing.filter(Boolean)) {
      xml = xml.replace(new RegExp(`<[A-Za-z:]+\\b[^<>]*\\br:id="${id.replace(/[^\w-]/g, '')}"[^<>]*/>`, 'g'), '');
    }
    zip.file(owner, xml);
  }
  if (!dropped) return { buffer: buf, dropped };
  return { buffer: await zip.generateAsync({ type: 'nodebuffer', compression: 'STORE' }), dropped };
}

/** An XLSX upload opened with exceljs, after the zip-bomb check and the repair above. */
export async function openWorkbook(buf: Buffer): Promise<{ workbook: ExcelJS.Workbook; droppedReferences: number }> {
  const check = inspectZip(buf);
  if (!check.ok) throw unprocessable('unsafe_workbook', check.message!);
  const workbook = new ExcelJS.Workbook();
  let droppedReferences = 0;
  try {
    const repaired = await dropDanglingParts(buf);
    droppedReferences = repaired.dropped;
    await workbook.xlsx.load(repaired.buffer as unknown as ArrayBuffer);
  } catch (error) {
    throw unprocessable('unreadable_workbook', `The XLSX workbook could not be read (${(error as Error).message.slice(0, 120)}); save it again from your spreadsheet program.`);
  }
  return { workbook, droppedReferences };
}
