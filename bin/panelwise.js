#!/usr/bin/env node
// Runs the Panelwise command line (server/cli/panelwise.ts) through tsx, passing arguments,
// standard streams and the exit code through.
import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const cli = fileURLToPath(new URL('../server/cli/panelwise.ts', import.meta.url));
const loader = import.meta.resolve('tsx');
const child = spawn(process.execPath, ['--import', loader, cli, ...process.argv.slice(2)], { stdio: 'inherit' });
child.on('exit', (code, signal) => {
  if (signal) process.kill(process.pid, signal);
  else process.exit(code ?? 1);
});
child.on('error', (err) => {
  process.stderr.write(`panelwise: cannot start: ${err.message}\n`);
  process.exit(1);
});
