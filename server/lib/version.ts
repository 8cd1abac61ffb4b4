import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

/** The software version stamped on exhibits and answers. */
export const version: string = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')).version;
