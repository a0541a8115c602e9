/**
 * The load benchmark's /api/health probe, in a process of its own (bench/load.bench.ts starts it):
 * one connection, one request after another, each answer printed as a JSON line
 * `{"at": epoch ms sent, "ms": latency, "status": code}` (status 0: socket error or 10 s timeout).
 * In its own process, the probe's clock is not held up by the 50 connections' responses that the
 * benchmark's own event loop handles, so what it measures is the server's delay. Stops on SIGTERM.
 *
 *   npx tsx bench/health-probe.ts http://127.0.0.1:PORT/api/health
 */
import autocannon from 'autocannon';

const url = process.argv[2];
if (!url) {
  console.error('usage: health-probe URL');
  process.exit(2);
}
const epoch = () => performance.timeOrigin + performance.now();
const instance = autocannon({ url, connections: 1, duration: 900, timeout: 10 });
instance.on('response', (_client, statusCode, _bytes, responseTime) =>
  process.stdout.write(`${JSON.stringify({ at: epoch() - responseTime, ms: responseTime, status: statusCode })}\n`),
);
instance.on('reqError', () => process.stdout.write(`${JSON.stringify({ at: epoch(), ms: null, status: 0 })}\n`));
process.on('SIGTERM', () => instance.stop());
instance.on('done', () => process.exit(0));
