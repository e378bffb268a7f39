/**
 * `annula serve`: the workspace in the browser (browser mode), served with the backend
 * handlers on 127.0.0.1 only, on a free port, behind a per-launch secret token.
 */
import type { Command } from 'commander';
import { resolveStorePath } from '../../node/store';
import { DEFAULT_RENDERER_DIR, DEFAULT_SAMPLES_DIR, openInBrowser, rendererIndexExists, startLoopbackServer } from '../../server';
import type { CliIo } from '../cli-io';
import { InputError, UsageError } from '../exit-codes';
import { STORE_OPTION_HELP } from '../store-access';

interface ServeOptions {
  port?: string;
  open: boolean;
  store?: string;
  renderer?: string;
}

function readPort(text: string | undefined): number {
  if (text === undefined) return 0;
  const port = Number(text);
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new UsageError(`--port: "${text}" is not a port number (1 to 65535, or 0 for a free one)`);
  return port;
}

/** Resolves when the process is asked to stop (Ctrl+C or a termination signal). */
function untilStopped(): Promise<string> {
  return new Promise((resolve) => {
    const stop = (signal: string): void => {
      process.off('SIGINT', onInt);
      process.off('SIGTERM', onTerm);
      resolve(signal);
    };
    const onInt = (): void => stop('SIGINT');
    const onTerm = (): void => stop('SIGTERM');
    process.on('SIGINT', onInt);
    process.on('SIGTERM', onTerm);
  });
}

export function registerServe(program: Command, io: CliIo): void {
  program
    .command('serve')
    .description('open the workspace in your web browser, served from this computer only (127.0.0.1)')
    .option('--port <n>', 'port to listen on (default: a free one)')
    .option('--no-open', 'print the address but do not open a browser')
    .option('--store <file>', STORE_OPTION_HELP)
    .option('--renderer <dir>', 'folder of the built workspace (default: out/renderer; build it with npm run build:renderer)')
    .addHelpText('after', '\nThe address carries a secret token that changes at every launch: only someone with it can use the workspace.\nStop the server with Ctrl+C.')
    .action(async (opts: ServeOptions) => {
      const port = readPort(opts.port);
      const rendererDir = opts.renderer ?? DEFAULT_RENDERER_DIR;
      if (!(await rendererIndexExists(rendererDir))) {
        throw new InputError(`the workspace is not built (no index.html in ${rendererDir}); run npm run build:renderer, or start it with npm run serve`);
      }
      let storePath: string;
      try {
        storePath = resolveStorePath({ option: opts.store }).path;
      } catch (error) {
        throw new UsageError((error as Error).message);
      }
      let server;
      try {
        server = await startLoopbackServer({ rendererDir, port, context: { samplesDir: DEFAULT_SAMPLES_DIR, storePath } });
      } catch (error) {
        const code = (error as { code?: string }).code;
        if (code === 'EADDRINUSE') throw new UsageError(`--port: port ${port} is taken; choose another or leave --port out for a free one`);
        throw error;
      }
      io.out(`Annula workspace: ${server.url}`);
      io.out(`lab store: ${storePath}`);
      io.out('Stop with Ctrl+C.');
      if (opts.open && !(await openInBrowser(server.url))) io.err('annula serve: could not start a browser; open the address above yourself');
      await untilStopped();
      await server.close();
    });
}
