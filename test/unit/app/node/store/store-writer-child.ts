/**
 * A writer for the kill test (store-kill.test.ts), run as its own process:
 *   node --import tsx store-writer-child.ts <store file> <label> <count> [wait]
 * Opens (or creates) the store, prints "ready" (with "wait": then waits for a line on its
 * standard input, so two writers can be started together), then adds <count> analyses, printing
 * "committed <id> <sample id>" after each add returns, i.e. after the record is on disk.
 * The test kills it with SIGKILL at random moments and checks the store after each kill.
 */
import { openLabStore } from '../../../../../app/node/store';
import { fingerprint } from './store-test-records';

const [storePath, label, countText, wait] = process.argv.slice(2);
if (!storePath || !label || !countText) {
  process.stderr.write('usage: store-writer-child.ts <store file> <label> <count>\n');
  process.exit(2);
}
const store = await openLabStore(storePath, { create: true, tool: `kill-test writer ${label}`, lockTimeoutMs: 30_000 });
process.stdout.write('ready\n');
if (wait === 'wait') {
  await new Promise((resolve) => process.stdin.once('data', resolve));
  process.stdin.destroy(); // so the open pipe does not keep this process alive
}
const count = Number(countText);
for (let i = 0; i < count; i++) {
  const sampleId = `${label}-${i}`;
  const record = await store.addAnalysis({
    sampleId,
    operator: 'kill-test writer',
    // Fingerprint and result follow from the sample id, so the test can check the content too.
    imageSha256: fingerprint(sampleId),
    phase: 'TiN',
    aA: 4.24 + i * 1e-5,
    result: { sampleId, step: i, profile: Array.from({ length: 64 }, (_, k) => k * i) },
  });
  process.stdout.write(`committed ${record.id} ${sampleId}\n`);
}
await store.close();
process.stdout.write('done\n');
