/**
 * Exhibits to print: one exhibit as a vector PDF, and publication packs: one PDF with every
 * published exhibit of a board (in the order of its panels) or of a chosen set (in the order
 * given), numbered "Chart 1", "Chart 2", …, and a ZIP of their data files (CSV and XLSX).
 * Packs hold published exhibits only, so a reader gets nothing they could not open one by one.
 */
import archiver from 'archiver';
import { conflict } from '../../lib/errors.js';
import type { Exhibit, Snapshot } from '../../schemas/exhibits.js';
import type { PublicUser } from '../../schemas/people.js';
import { getBoard } from '../boards.js';
import { exhibitExport } from '../exports.js';
import { getSettings } from '../settings.js';
import { printPdf } from '../../workers/print-pool.js';
import { getExhibit, type ExhibitDeps } from './read.js';

export const PDF_TYPE = 'application/pdf';
export const ZIP_TYPE = 'application/zip';

const fileSafe = (s: string) => s.replace(/[^A-Za-z0-9_.-]+/g, '_').slice(0, 60);

/** One exhibit as PDF: its frozen snapshot, or a draft's live content (marked as such in the file name). */
export async function exhibitPdf(deps: ExhibitDeps, user: PublicUser, id: number) {
  const ex = await getExhibit(deps, user, id);
  const snap = ex.editable ? ex.live : (ex.snapshot ?? ex.live);
  if (!snap) throw conflict('no_content', 'This exhibit has no content to print yet.');
  const settings = await getSettings(deps.db);
  const body = await printPdf([{ snapshot: snap }], { title: snap.text.title, institution: snap.publication?.institution || settings.institutionName });
  const draft = !ex.snapshot || ex.editable ? '-draft' : '';
  return { filename: `exhibit-${ex.id}-r${ex.revision}${draft}.pdf`, contentType: PDF_TYPE, body };
}

/** The published exhibits drafted from a board's panels, in the order of the panels (a superseded one gives way to its update). */
async function boardExhibits(deps: ExhibitDeps, user: PublicUser, boardId: number) {
  const board = await getBoard(deps.db, user, boardId);
  const panelIds = board.panels.map((p) => p.id);
  const rows = panelIds.length ? await deps.db('exhibits').whereIn('panel_id', panelIds).where('status', 'published').whereNotIn('id', deps.db('exhibit_supersessions').select('exhibit_id')).select('id', 'panel_id') : [];
  rows.sort((a, b) => panelIds.indexOf(a.panel_id) - panelIds.indexOf(b.panel_id) || a.id - b.id);
  const exhibits = await Promise.all(rows.map((r) => getExhibit(deps, user, r.id)));
  if (!exhibits.length) throw conflict('nothing_published', `The board “${board.title}” has no published exhibit yet: a publication pack holds published exhibits only.`);
  return { title: board.title, exhibits };
}

/** Chosen exhibits, in the order given; each must be published. */
async function chosenExhibits(deps: ExhibitDeps, user: PublicUser, ids: number[]) {
  const exhibits: Exhibit[] = [];
  for (const id of ids) {
    const ex = await getExhibit(deps, user, id);
    if (ex.status !== 'published' || !ex.snapshot) throw conflict('not_published', `Exhibit ${id} (“${ex.title}”) is ${ex.status.replace('_', ' ')}: a publication pack holds published exhibits only.`);
    exhibits.push(ex);
  }
  return { title: 'Publication pack', exhibits };
}

export type PackSource = { boardId: number } | { ids: number[] };

async function packExhibits(deps: ExhibitDeps, user: PublicUser, source: PackSource) {
  return 'boardId' in source ? boardExhibits(deps, user, source.boardId) : chosenExhibits(deps, user, source.ids);
}

/** The publication pack as one PDF, numbered in order. */
export async function packPdf(deps: ExhibitDeps, user: PublicUser, source: PackSource) {
  const { title, exhibits } = await packExhibits(deps, user, source);
  const settings = await getSettings(deps.db);
  const items = exhibits.map((ex, i) => ({ snapshot: ex.snapshot as Snapshot, number: `Chart ${i + 1}` }));
  const body = await printPdf(items, { title, institution: settings.institutionName });
  return { filename: `${fileSafe(title)}-pack.pdf`, contentType: PDF_TYPE, body };
}

/** The data files of the pack's exhibits (CSV and XLSX each, named by their chart number), as one ZIP. */
export async function packZip(deps: ExhibitDeps, user: PublicUser, source: PackSource) {
  const { title, exhibits } = await packExhibits(deps, user, source);
  const zip = archiver('zip', { zlib: { level: 6 } });
  const chunks: Buffer[] = [];
  zip.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    zip.on('end', () => resolve(Buffer.concat(chunks)));
    zip.on('error', reject);
  });
  for (const [i, ex] of exhibits.entries()) {
    const name = `chart-${String(i + 1).padStart(2, '0')}-${fileSafe(ex.title)}`;
    for (const format of ['csv', 'xlsx'] as const) {
      const file = await exhibitExport(deps, { user, id: ex.id }, format);
      zip.append(typeof file.body === 'string' ? Buffer.from(file.body, 'utf8') : file.body, { name: `${name}.${format}` });
    }
  }
  await zip.finalize();
  return { filename: `${fileSafe(title)}-data.zip`, contentType: ZIP_TYPE, body: await done };
}
