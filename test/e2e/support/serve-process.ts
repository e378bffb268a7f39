/**
 * Starts the real `annula serve` (app/cli/bin/annula.js) on a free port with a temporary
 * store, and stops it by its own process id.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

export interface ServeProcess {
  url: string;
  origin: string;
  port: number;
  token: string;
  storeDir: string;
  stop(): Promise<void>;
}

const root = resolve(import.meta.dirname, '..', '..', '..');

export async function startServe(): Promise<ServeProcess> {
  const storeDir = await mkdtemp(join(tmpdir(), 'annula-e2e-'));
  const child: ChildProcess = spawn(process.execPath, [join(root, 'app/cli/bin/annula.js'), 'serve', '--no-open', '--port', '0', '--store', join(storeDir, 'lab.sqlite')], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  const url = await new Promise<string>((resolvePromise, reject) => {
    const timer = setTimeout(() => reject(new Error(`annula serve printed no address in 60 s; stdout: ${out} stderr: ${err}`)), 60_000);
    child.stdout!.on('data', (chunk: Buffer) => {
      out += chunk.toString();
      const m = /Annula workspace: (http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
      if (m) {
        clearTimeout(timer);
        resolvePromise(m[1]!);
      }
    });
    child.stderr!.on('data', (chunk: Buffer) => (err += chunk.toString()));
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`annula serve exited with ${code}: ${err}`));
    });
  });
  const parsed = new URL(url);
  return {
    url,
    origin: parsed.origin,
    port: Number(parsed.port),
    token: parsed.searchParams.get('token')!,
    storeDir,
    async stop() {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await exited;
      }
      await rm(storeDir, { recursive: true, force: true });
    },
  };
}
