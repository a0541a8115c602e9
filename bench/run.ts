import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

/**
 * `npm run bench`: runs every bench/*.bench.ts in its own process, one after the other (the
 * machine has two cores; benchmarks must not compete). `npm run bench -- import` runs only the
 * files whose name contains "import"; `npm run bench -- cli-vs-python` runs the command line
 * against ../shared/bench/py_reference_pipeline.py (cli-vs-python.bench.ts). Each benchmark prints medians and their ratio to a floor
 * measured in the same run, and writes JSON to bench/out/.
 */
const folder = import.meta.dirname;
const filter = process.argv[2];
const files = fs
  .readdirSync(folder)
  .filter((f) => f.endsWith('.bench.ts') && (!filter || f.includes(filter)))
  .sort();
fs.mkdirSync(path.join(folder, 'out'), { recursive: true });
let failed = 0;
for (const file of files) {
  console.log(`\n=== ${file}`);
  const result = spawnSync(process.execPath, ['--import', 'tsx', '--expose-gc', path.join(folder, file)], { stdio: 'inherit' });
  if (result.status !== 0) failed++;
}
if (files.length === 0) console.log('no benchmark matched');
process.exit(failed ? 1 : 0);
