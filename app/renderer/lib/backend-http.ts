/**
 * Browser mode's backend: POST /api/<handler> on the page's own origin. The token
 * cookie set when the user opened the printed address goes with every request.
 */
import type { BytesResult, HandlerErrorData } from '../../handlers/contract';
import { BackendError, type Backend } from './backend';

async function failure(response: Response): Promise<BackendError> {
  let data: HandlerErrorData | null = null;
  try {
    const body = (await response.json()) as { error?: HandlerErrorData };
    data = body.error ?? null;
  } catch {
    data = null;
  }
  if (data) return new BackendError(data);
  const problem = `the local server answered ${response.status} ${response.statusText}`;
  const action = response.status === 401 ? 'open the address that annula serve printed (it carries the token)' : 'check that annula serve is still running';
  return new BackendError({ code: 'internal', problem, action, message: `${problem}; ${action}` });
}

async function post(path: string, init: RequestInit): Promise<Response> {
  let response: Response;
  try {
    response = await fetch(path, { method: 'POST', credentials: 'same-origin', ...init });
  } catch {
    throw new BackendError({ code: 'internal', problem: 'the local server does not answer', action: 'start annula serve again and reload this page', message: 'the local server does not answer; start annula serve again and reload this page' });
  }
  if (!response.ok) throw await failure(response);
  return response;
}

async function callJson<T>(name: string, input: unknown): Promise<T> {
  const response = await post(`api/${name}`, { headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(input) });
  return ((await response.json()) as { value: T }).value;
}

async function callBytes<M>(name: string, input: unknown): Promise<BytesResult<M>> {
  const response = await post(`api/${name}`, { headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(input) });
  const meta = JSON.parse(decodeURIComponent(response.headers.get('X-Annula-Meta') ?? '{}')) as M;
  return { meta, bytes: new Uint8Array(await response.arrayBuffer()) };
}

export const httpBackend: Backend = {
  kind: 'browser',
  listSamples: () => callJson('list-samples', {}),
  readSample: (id) => callBytes('read-sample', { id }),
  async fingerprintImage(name, bytes) {
    const response = await post(`api/raw/fingerprint-image?name=${encodeURIComponent(name)}`, { headers: { 'Content-Type': 'application/octet-stream' }, body: bytes as BodyInit });
    return ((await response.json()) as { value: Awaited<ReturnType<Backend['fingerprintImage']>> }).value;
  },
  listCalibrations: () => callJson('list-calibrations', {}),
  findCalibration: (name) => callJson('find-calibration', { name }),
  saveCalibration: (calibration) => callJson('save-calibration', { calibration }),
  calibrationHistory: (instrument) => callJson('calibration-history', { instrument }),
  recordCheck: (check) => callJson('record-check', check),
  phaseHistory: (phase) => callJson('phase-history', { phase }),
  async saveExport(suggestedName, extension, bytes) {
    // Browser mode writes no file itself: the browser downloads it (and never replaces one silently).
    const type = { pdf: 'application/pdf', csv: 'text/csv', json: 'application/json', png: 'image/png' }[extension];
    const url = URL.createObjectURL(new Blob([bytes as BlobPart], { type }));
    const a = document.createElement('a');
    a.href = url;
    a.download = suggestedName;
    a.rel = 'noopener';
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 60_000);
    return suggestedName;
  },
};
