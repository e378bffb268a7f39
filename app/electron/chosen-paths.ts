/**
 * The files the user chose in this session's native dialogs: the only paths the main
 * process reads (open dialog) or will write (save dialog). Paths are compared after
 * resolving, so "a/../b" cannot pass for "b"'s neighbour.
 */
import { resolve } from 'node:path';

export class ChosenPaths {
  readonly #readable = new Set<string>();
  readonly #writable = new Set<string>();

  allowRead(path: string): void {
    this.#readable.add(resolve(path));
  }

  allowWrite(path: string): void {
    this.#writable.add(resolve(path));
  }

  mayRead(path: string): boolean {
    return this.#readable.has(resolve(path));
  }

  mayWrite(path: string): boolean {
    return this.#writable.has(resolve(path));
  }
}
