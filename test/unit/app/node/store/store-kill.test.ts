/**
 * The store under writers that are killed: child processes (store-writer-child.ts, run with
 * node and tsx) add analyses in a loop and print each id once its add has returned; the test
 * kills them with SIGKILL at random moments (seeded) and after every kill reopens the store
 * and checks that it opens and holds every record reported as committed, with its content.
 * Two writers run at once, so kills also land while the other writer waits for the lock or
 * finds a stale one.
 */
import { spawn, type ChildProcessByStdio } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Readable, Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { lockPathOf, openLabStore } from '../../../../../app/node/store';
import { mulberry32 } from '../../../../support/seeded-random';
import { fingerprint, temporaryFolder } from './store-test-records';

const CHILD = fileURLToPath(new URL('./store-writer-child.ts', import.meta.url));
const REPO = fileURLToPath(new URL('../../../../../', import.meta.url));

const folder = temporaryFolder('annula-store-kill-');
afterAll(() => folder.remove());

interface Writer {
  child: ChildProcessByStdio<Writable, Readable, Readable>;
  /** Resolves at "ready" (true) or when the process ends first (false). */
  ready: Promise<boolean>;
  closed: Promise<void>;
  committed: Array<{ id: number; sampleId: string }>;
  stderr: () => string;
}

function startWriter(store: string, label: string, count: number, onCommit: (id: number, sampleId: string) => void, wait = false): Writer {
  const args = ['--import', 'tsx', CHILD, store, label, String(count), ...(wait ? ['wait'] : [])];
  const child = spawn(process.execPath, args, { cwd: REPO, stdio: ['pipe', 'pipe', 'pipe'] });
  const committed: Writer['committed'] = [];
  let stderr = '';
  let pending = '';
  let markReady: (v: boolean) => void = () => undefined;
  const ready = new Promise<boolean>((r) => (markReady = r));
  child.stdout.setEncoding('utf8').on('data', (chunk: string) => {
    pending += chunk;
    const lines = pending.split('\n');
    pending = lines.pop()!;
    for (const line of lines) {
      if (line === 'ready') markReady(true);
      const m = /^committed (\d+) (\S+)$/.exec(line);
      if (m) {
        committed.push({ id: Number(m[1]), sampleId: m[2]! });
        onCommit(Number(m[1]), m[2]!);
      }
    }
  });
  child.stderr.setEncoding('utf8').on('data', (chunk: string) => (stderr += chunk));
  const closed = new Promise<void>((r) => child.on('close', () => (markReady(false), r())));
  return { child, ready, closed, committed, stderr: () => stderr };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('the lab store under killed writers', () => {
  it('reopens after each of 36 SIGKILLs at random moments (seed 20260302) holding every committed record', { timeout: 120_000 }, async () => {
    const SEED = 20260302;
    const KILLS_PER_WRITER = 18;
    const store = join(folder.dir, 'killed.sqlite');
    const reported = new Map<number, string>();
    const figures = { kills: 0, killedBeforeReady: 0, reopened: 0, staleLocksLeft: 0, temporaryFilesLeft: 0, committedPerKill: [] as number[], unreportedButSaved: 0 };
    const started = Date.now();

    async function checkAfterKill(killed: Writer, label: string): Promise<void> {
      const snapshot = new Map(reported);
      if (!existsSync(store)) {
        // Only possible before any writer got as far as creating the store.
        expect(snapshot.size).toBe(0);
        return;
      }
      const opened = await openLabStore(store);
      figures.reopened++;
      try {
        const list = await opened.listAnalyses();
        const byId = new Map(list.map((a) => [a.id, a.sampleId]));
        expect(byId.size).toBe(list.length);
        expect(new Set(list.map((a) => a.sampleId)).size).toBe(list.length);
        for (const [id, sampleId] of snapshot) expect(byId.get(id), `committed record ${id} (${sampleId})`).toBe(sampleId);
        // The killed writer's records: each intact, and at most one more than it reported
        // (killed after its file was renamed into place but before it printed).
        const mine = list.filter((a) => a.sampleId!.startsWith(`${label}-`));
        const extra = mine.filter((a) => !snapshot.has(a.id));
        expect(extra.length).toBeLessThanOrEqual(1);
        if (extra.length) expect(extra[0]!.sampleId).toBe(`${label}-${killed.committed.length}`);
        figures.unreportedButSaved += extra.length;
        for (const a of mine) {
          const full = await opened.findAnalysis(a.id);
          const step = Number(a.sampleId!.slice(label.length + 1));
          expect(full?.imageSha256).toBe(fingerprint(a.sampleId!));
          expect(full?.result).toEqual({ sampleId: a.sampleId, step, profile: Array.from({ length: 64 }, (_, k) => k * step) });
        }
      } finally {
        await opened.close();
      }
    }

    async function lane(name: string, seed: number): Promise<void> {
      const rand = mulberry32(seed);
      for (let k = 0; k < KILLS_PER_WRITER; k++) {
        const label = `${name}${k}`;
        const writer = startWriter(store, label, 100_000, (id, sampleId) => reported.set(id, sampleId));
        // One kill in five lands at a random moment from the start (often while opening or
        // creating the store); the others after 0 to 9 committed records plus a random part
        // of a write (one write took about 12 ms here with no other writer).
        if (rand() < 0.2) {
          await sleep(rand() * 900);
          if ((await Promise.race([writer.ready, sleep(0).then(() => null)])) === null) figures.killedBeforeReady++;
        } else {
          const ok = await writer.ready;
          expect(ok, `writer ${label} stopped before it was ready: ${writer.stderr()}`).toBe(true);
          const target = Math.floor(rand() * 10);
          while (writer.committed.length < target && writer.child.exitCode === null) await sleep(2);
          await sleep(rand() * 40);
        }
        writer.child.kill('SIGKILL');
        await writer.closed;
        expect(writer.child.signalCode, writer.stderr()).toBe('SIGKILL');
        figures.kills++;
        figures.committedPerKill.push(writer.committed.length);
        const pid = writer.child.pid!;
        const lock = lockPathOf(store);
        if (existsSync(lock) && readFileSync(lock, 'utf8').includes(`"pid":${pid},`)) figures.staleLocksLeft++;
        figures.temporaryFilesLeft += readdirSync(folder.dir).filter((f) => f.endsWith('.tmp') && f.includes(`.${pid}.`)).length;
        await checkAfterKill(writer, label);
      }
    }

    await Promise.all([lane('a', SEED), lane('b', SEED + 1)]);

    // A last writer that is not killed: it recovers any stale lock, removes leftovers and adds 3.
    const before = reported.size;
    const last = startWriter(store, 'final', 3, (id, sampleId) => reported.set(id, sampleId));
    await last.closed;
    expect(last.child.exitCode, last.stderr()).toBe(0);
    expect(reported.size).toBe(before + 3);
    const final = await openLabStore(store);
    const all = await final.listAnalyses();
    await final.close();
    for (const [id, sampleId] of reported) expect(all.find((a) => a.id === id)?.sampleId).toBe(sampleId);
    const leftovers = readdirSync(folder.dir).filter((f) => f !== 'killed.sqlite');
    expect(leftovers).toEqual([]);

    const seconds = (Date.now() - started) / 1000;
    console.log(
      `kill test (seed ${SEED}): ${figures.kills} kills (${figures.killedBeforeReady} before the writer was ready), ${figures.reopened} reopens all succeeded; ` +
        `${reported.size} records reported committed, ${all.length} in the store (${figures.unreportedButSaved} saved but killed before reporting); ` +
        `records per writer before its kill: min ${Math.min(...figures.committedPerKill)}, max ${Math.max(...figures.committedPerKill)}; ` +
        `kills that left a stale lock: ${figures.staleLocksLeft}, a temporary file: ${figures.temporaryFilesLeft}; ${seconds.toFixed(1)} s`,
    );
    expect(figures.kills).toBe(2 * KILLS_PER_WRITER);
    expect(all.length).toBe(reported.size + figures.unreportedButSaved);
  });

  it('two writers taking turns (30 records each, started together) lose none of each other\'s records', { timeout: 60_000 }, async () => {
    const store = join(folder.dir, 'turns.sqlite');
    const first = startWriter(store, 'left', 1, () => undefined); // creates the store, so both below open it
    await first.closed;
    const a = startWriter(store, 'left', 30, () => undefined, true);
    const b = startWriter(store, 'right', 30, () => undefined, true);
    expect([await a.ready, await b.ready], a.stderr() + b.stderr()).toEqual([true, true]);
    a.child.stdin.write('go\n');
    b.child.stdin.write('go\n');
    await Promise.all([a.closed, b.closed]);
    expect([a.child.exitCode, b.child.exitCode], a.stderr() + b.stderr()).toEqual([0, 0]);
    const opened = await openLabStore(store);
    const list = (await opened.listAnalyses()).slice(1);
    await opened.close();
    expect(list.map((x) => x.id)).toEqual(Array.from({ length: 60 }, (_, i) => i + 2));
    expect(list.map((x) => x.sampleId).sort()).toEqual([...Array.from({ length: 30 }, (_, i) => `left-${i}`), ...Array.from({ length: 30 }, (_, i) => `right-${i}`)].sort());
    expect([...a.committed, ...b.committed].map((c) => c.id).sort((x, y) => x - y)).toEqual(list.map((x) => x.id));
    // They did take turns: the waiting writer got the lock between the other's writes.
    const owners = list.map((x) => x.sampleId!.split('-')[0]);
    const switches = owners.filter((o, i) => i > 0 && o !== owners[i - 1]).length;
    console.log(`two writers started together: the store changed hands ${switches} times in 60 records`);
    expect(switches).toBeGreaterThan(1);
  });
});
