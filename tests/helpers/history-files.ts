/** Release-history files for the tests of issue 12: wide and long, CSV and XLSX, as offices make them. */
import ExcelJS from 'exceljs';
import JSZip from 'jszip';

export type Cell = string | number | Date | null;

const csvCell = (c: Cell) => {
  const s = c instanceof Date ? c.toISOString().slice(0, 10) : String(c ?? '');
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};
export const csvOf = (rows: Cell[][]) => Buffer.from(rows.map((r) => r.map(csvCell).join(',')).join('\n') + '\n');

export const utc = (d: string) => new Date(`${d}T00:00:00Z`);

/** `n` quarters from 2000-Q1 written as `2000-Q1`…; value(i) for each. */
export const quarterRows = (n: number, value: (i: number) => Cell) => Array.from({ length: n }, (_, i) => [`${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1}`, value(i)]);

/** A workbook with the given sheets (each a list of rows and optional merged ranges). */
export async function workbook(sheets: { name: string; rows: Cell[][]; merge?: string[] }[]): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  for (const s of sheets) {
    const ws = wb.addWorksheet(s.name);
    for (const r of s.rows) ws.addRow(r as ExcelJS.CellValue[]);
    for (const m of s.merge ?? []) ws.mergeCells(m);
  }
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/**
 * The workbook with internal references to parts it does not contain: the first sheet names a
 * drawing (as a chart would) and a comments part that are not in the file.
 */
export async function withDanglingReferences(buf: Buffer): Promise<Buffer> {
  const zip = await JSZip.loadAsync(buf);
  const sheet = 'xl/worksheets/sheet1.xml';
  zip.file(sheet, (await zip.file(sheet)!.async('string')).replace('</worksheet>', '<drawing r:id="rId90"/><legacyDrawing r:id="rId91"/></worksheet>'));
  const relsPath = 'xl/worksheets/_rels/sheet1.xml.rels';
  const rels = (await zip.file(relsPath)?.async('string')) ?? '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"></Relationships>';
  zip.file(
    relsPath,
    rels.replace(
      '</Relationships>',
      '<Relationship Id="rId90" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/drawing" Target="../drawings/drawing1.xml"/>' +
        '<Relationship Id="rId91" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/vmlDrawing" Target="../drawings/vmlDrawing1.vml"/></Relationships>',
    ),
  );
  return zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
}
