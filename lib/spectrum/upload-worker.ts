/**
 * Worker-thread body for lib/spectrum/worker.ts: reads one uploaded file (sniff, and parse a
 * spectrum) and posts the result back. A production build compiles it, with what it imports, into
 * one plain JavaScript file (scripts/build-worker.mjs); in development and tests
 * upload-worker.mjs runs it from source through tsx.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { readUpload } from './read-upload';

const { bytes, name, wantSpectrum } = workerData as { bytes: Uint8Array; name: string; wantSpectrum: boolean };
parentPort!.postMessage(readUpload(new Uint8Array(bytes), name, wantSpectrum));
