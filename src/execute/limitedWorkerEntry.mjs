// The first code of a limited worker: loads TypeScript support when kvarbook runs from its sources, then answers each call with one export of one module.
import { parentPort, workerData } from 'node:worker_threads';

if (workerData.fromSource) {
  const { register } = await import('tsx/esm/api');
  register();
}
const handler = (await import(workerData.moduleUrl))[workerData.exportName];

/** An error as plain data: its name, message and own text or number fields (a ChartSpecError's path and hint). */
function plainError(error) {
  const plain = { name: 'Error', message: String(error) };
  if (error !== null && typeof error === 'object') {
    for (const [key, value] of Object.entries(error)) {
      if (typeof value === 'string' || typeof value === 'number') plain[key] = value;
    }
    if (typeof error.name === 'string') plain.name = error.name;
    if (typeof error.message === 'string') plain.message = error.message;
  }
  return plain;
}

parentPort.on('message', async ({ id, input }) => {
  try {
    parentPort.postMessage({ id, ok: true, value: await handler(input) });
  } catch (error) {
    parentPort.postMessage({ id, ok: false, error: plainError(error) });
  }
});
parentPort.postMessage({ ready: true });
