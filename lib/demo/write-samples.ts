/** Writes public/samples/*.csv from `sampleFiles()` (run: npx tsx lib/demo/write-samples.ts). */
import fs from 'node:fs';
import path from 'node:path';
import { sampleFiles } from './index';

const dir = path.join(import.meta.dirname, '..', '..', 'public', 'samples');
fs.mkdirSync(dir, { recursive: true });
for (const [name, text] of Object.entries(sampleFiles())) {
  fs.writeFileSync(path.join(dir, name), text);
  console.log(`${name}: ${text.split('\n').length - 2} rows`);
}
