// Worker-thread entry for lib/spectrum/worker.ts: reads one uploaded file (sniff, and parse a
// spectrum) and posts the result back. Plain JavaScript so Node can start it directly; the
// TypeScript reader is loaded through tsx, which the app ships as a dependency.
import { parentPort, workerData } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

const { readUpload } = await tsImport('./read-upload.ts', import.meta.url);
const { bytes, name, wantSpectrum } = workerData;
parentPort.postMessage(readUpload(new Uint8Array(bytes), name, wantSpectrum));
