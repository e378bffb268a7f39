import { spawn, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, unlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { LabStoreError, lockPathOf, openLabStore, type LabStore } from '../../../../../app/node/store';
import { analysis, temporaryFolder } from './store-test-records';

const folder = temporaryFolder('annula-store-lock-');
afterAll(() => folder.remove());

let counter = 0;
async function freshStore(lockTimeoutMs = 400): Promise<{ store: LabStore; path: string; lock: string }> {
  const path = join(folder.dir, `store-${++counter}.sqlite`);
  const store = await openLabStore(path, { create: true, lockTimeoutMs, tool: 'lock test' });
  return { store, path, lock: lockPathOf(path) };
}

/** The pid of a process that has ended (and been reaped), so it is certainly not running. */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', ''], { stdio: 'ignore' });
  expect(child.status).toBe(0);
  return child.pid!;
}

function lockFile(pid: number, host: string, tool = 'annula desktop'): string {
  return JSON.stringify({ pid, host, since: '2026-03-02T09:00:00.000Z', tool, token: 'someone-else' });
}

describe('the store lock', () => {
  it('is taken for each write and removed afterwards', async () => {
    const { store, path, lock } = await freshStore();
    await store.addAnalysis(analysis());
    expect(existsSync(lock)).toBe(false);
    expect(readdirSync(folder.dir).filter((f) => f.includes(`store-${counter}.`) && f !== `store-${counter}.sqlite`)).toEqual([]);
    expect((await store.listAnalyses()).length).toBe(1);
    await store.close();
    expect(existsSync(path)).toBe(true);
  });

  it('a stale lock (its pid is not running on this host) is recovered and the write goes through', async () => {
    const { store, lock } = await freshStore();
    writeFileSync(lock, lockFile(deadPid(), hostname()));
    const added = await store.addAnalysis(analysis());
    expect(added.id).toBe(1);
    expect(existsSync(lock)).toBe(false);
    await store.close();
  });

  it('a writer waits for a live holder, then fails after the bounded wait naming it; the store and the lock are untouched', async () => {
    const { store, path, lock } = await freshStore(300);
    const holder = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 20000)'], { stdio: 'ignore' });
    try {
      const content = lockFile(holder.pid!, hostname());
      writeFileSync(lock, content);
      const before = readFileSync(path);
      const started = Date.now();
      const error = (await store.addAnalysis(analysis()).catch((e: unknown) => e)) as LabStoreError;
      const waited = Date.now() - started;
      expect(error).toBeInstanceOf(LabStoreError);
      expect(error.reason).toBe('locked');
      expect(waited).toBeGreaterThanOrEqual(300);
      expect(error.holder).toEqual({ pid: holder.pid, host: hostname(), since: '2026-03-02T09:00:00.000Z', tool: 'annula desktop' });
      expect(error.message).toContain(`the lab store is being written by another program (annula desktop, pid ${holder.pid} on host ${hostname()}, since 2026-03-02T09:00:00.000Z) and stayed locked for 0.3 s; try again when it has finished, or, if that program is no longer running, delete ${lock}`);
      expect(readFileSync(lock, 'utf8')).toBe(content);
      expect(readFileSync(path).equals(before)).toBe(true);
    } finally {
      holder.kill('SIGKILL');
    }
    await store.close();
  });

  it('a writer that finds the lock taken gets it once the holder lets go within the wait', async () => {
    const { store, lock } = await freshStore(5000);
    // Held by this very process (so alive) until the timer lets go.
    writeFileSync(lock, lockFile(process.pid, hostname()));
    const started = Date.now();
    setTimeout(() => unlinkSync(lock), 250);
    const added = await store.addAnalysis(analysis());
    expect(Date.now() - started).toBeGreaterThanOrEqual(240);
    expect(added.id).toBe(1);
    expect(existsSync(lock)).toBe(false);
    await store.close();
  });

  it('never removes a lock of another host, nor a lock file it cannot read', async () => {
    const { store, lock } = await freshStore(200);
    writeFileSync(lock, lockFile(deadPid(), 'bench-pc-7.halden.invalid'));
    const remote = (await store.addAnalysis(analysis()).catch((e: unknown) => e)) as LabStoreError;
    expect(remote.reason).toBe('locked');
    expect(remote.message).toMatch(/on host bench-pc-7\.halden\.invalid.*\(a lock taken on another computer is never removed automatically\)/);
    expect(existsSync(lock)).toBe(true);
    writeFileSync(lock, '{"pid": 12');
    const damaged = (await store.addAnalysis(analysis()).catch((e: unknown) => e)) as LabStoreError;
    expect(damaged.reason).toBe('locked');
    expect(damaged.message).toMatch(/which cannot be read \(empty or damaged\), and stayed so for 0\.2 s; if no Annula program is writing to this store, delete .*\.lock and try again/);
    expect(readFileSync(lock, 'utf8')).toBe('{"pid": 12');
    expect(await store.listAnalyses()).toEqual([]);
    await store.close();
  });
});
