#!/usr/bin/env node
// Runs the Panelwise command line (server/cli/panelwise.ts). The TypeScript sources are bundled
// once with esbuild into node_modules/.cache/panelwise-cli/ and the bundle runs in this process;
// the bundle is built again when one of its source files changes (their sizes and times are kept
// beside it); the operator's commands always run from the sources. Without esbuild (an install without development packages) it runs the sources
// through tsx in a child process, passing arguments, standard streams and the exit code through.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = fileURLToPath(new URL('../', import.meta.url));
const entry = path.join(root, 'server/cli/panelwise.ts');
const cacheDir = path.join(root, 'node_modules/.cache/panelwise-cli');
const bundle = path.join(cacheDir, 'panelwise.mjs');
const inputsFile = path.join(cacheDir, 'inputs.json');

function stamp(file) {
  const s = fs.statSync(file);
  return `${s.size}:${s.mtimeMs}`;
}

/** Whether the bundle was built from the sources as they are now. */
function fresh() {
  try {
    const inputs = JSON.parse(fs.readFileSync(inputsFile, 'utf8'));
    if (!fs.existsSync(bundle)) return false;
    return Object.entries(inputs).every(([file, was]) => stamp(path.join(root, file)) === was);
  } catch {
    return false;
  }
}

async function build() {
  let esbuild;
  try {
    esbuild = await import('esbuild');
  } catch {
    return false;
  }
  const tag = `${process.pid}-${Date.now()}`;
  const out = `${bundle}.${tag}.tmp`;
  const result = esbuild.buildSync({
    entryPoints: [entry],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    outfile: out,
    metafile: true,
    // The operator's commands never run from the bundle (below): leaving them out keeps the
    // database layer and the password-strength dictionaries out of every `analyze` start.
    external: ['better-sqlite3', './ops-commands'],
    logLevel: 'silent',
    absWorkingDir: root,
  });
  const inputs = {};
  for (const file of Object.keys(result.metafile.inputs)) inputs[file] = stamp(path.join(root, file));
  fs.writeFileSync(`${inputsFile}.${tag}.tmp`, JSON.stringify(inputs));
  fs.renameSync(out, bundle);
  fs.renameSync(`${inputsFile}.${tag}.tmp`, inputsFile);
  return true;
}

function viaTsx() {
  const loader = import.meta.resolve('tsx');
  const child = spawn(process.execPath, ['--import', loader, entry, ...process.argv.slice(2)], { stdio: 'inherit' });
  child.on('exit', (code, signal) => {
    if (signal) process.kill(process.pid, signal);
    else process.exit(code ?? 1);
  });
  child.on('error', (err) => {
    process.stderr.write(`panelwise: cannot start: ${err.message}\n`);
    process.exit(1);
  });
}

// The operator's commands (create-owner, backup, restore, disable-demo) open the database and run
// migrations from their folder: they run from the sources, not from the bundle.
const OPERATOR_COMMANDS = ['create-owner', 'backup', 'restore', 'disable-demo'];
const operator = OPERATOR_COMMANDS.includes(process.argv[2] ?? '');

let ready = !operator && fresh();
if (!ready && !operator) {
  try {
    fs.mkdirSync(cacheDir, { recursive: true });
    ready = await build();
  } catch {
    ready = false;
  }
}
if (ready) {
  const cli = await import(pathToFileURL(bundle).href);
  process.exitCode = await cli.main(process.argv.slice(2));
} else {
  viaTsx();
}
