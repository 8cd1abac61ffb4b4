/**
 * The layout rules of DEVELOPERS.md, checked on the tree: no import circles in server/ and src/;
 * the client imports nothing of the server but server/schemas; the analysis layer imports no
 * Express, Knex or database; no file over 300 lines without a reason written at its top.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { importCircles, importGraph, sourceFiles } from '../helpers/imports.js';

const root = path.resolve(import.meta.dirname, '..', '..');
const files = sourceFiles(root, ['server', 'src']);
const graph = importGraph(root, files);

describe('the layout of the code', () => {
  it('reads the tree', () => {
    expect(files).toContain('server/analysis/index.ts');
    expect(graph.get('server/app.ts')).toContain('server/deps.ts');
  });

  it('has no import circles', () => {
    expect(importCircles(graph)).toEqual([]);
  });

  it('the client imports only server/schemas from the server', () => {
    const crossing = [...graph].flatMap(([file, targets]) => (file.startsWith('src/') ? targets.filter((t) => t.startsWith('server/') && !t.startsWith('server/schemas/')).map((t) => `${file} → ${t}`) : []));
    expect(crossing).toEqual([]);
  });

  it('the analysis layer and the shared schemas import no HTTP, database or service code', () => {
    const pure = files.filter((f) => f.startsWith('server/analysis/') || f.startsWith('server/schemas/'));
    const bad = pure.flatMap((f) => {
      const text = fs.readFileSync(path.join(root, f), 'utf8');
      const packages = [...text.matchAll(/from\s+['"](express|knex|mysql2|multer)['"]/g)].map((m) => m[1]);
      const local = (graph.get(f) ?? []).filter((t) => !t.startsWith('server/analysis/') && !t.startsWith('server/schemas/'));
      return [...packages, ...local].map((t) => `${f} → ${t}`);
    });
    expect(bad).toEqual([]);
  });

  it('keeps files under about 300 lines, or says why at the top', () => {
    const long = files.filter((f) => {
      const lines = fs.readFileSync(path.join(root, f), 'utf8').split('\n');
      return lines.length > 310 && !lines.slice(0, 15).some((l) => /longer than 300 lines/i.test(l));
    });
    expect(long).toEqual([]);
  });
});
