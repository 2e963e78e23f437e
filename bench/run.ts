import { readdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

/** Runs every `*.bench.js` beside this file (or those whose names contain one of the arguments). */
const here = dirname(fileURLToPath(import.meta.url));
const filters = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.js'))
  .filter((f) => filters.length === 0 || filters.some((x) => f.includes(x)))
  .sort();
console.log(`landform benchmarks — node ${process.version}, ${new Date().toISOString()}`);
for (const f of files) {
  const mod = (await import(pathToFileURL(`${here}/${f}`).href)) as { run: () => Promise<void> };
  await mod.run();
}
