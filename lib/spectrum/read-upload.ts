/**
 * What the upload check needs from a file's bytes, in one call that can run in a worker thread:
 * what the content is (sniffUpload) and, for a spectrum, the parsed spectrum.
 */
import { parseSpectrumFile, type SpectrumParse } from './parse';
import { sniffUpload, type SniffResult } from './sniff';

export interface UploadReading {
  sniff: SniffResult;
  /** Only when asked for a spectrum and the content is JCAMP-DX or CSV. */
  parsed?: SpectrumParse;
}

export function readUpload(bytes: Uint8Array, name: string, wantSpectrum: boolean): UploadReading {
  const sniff = sniffUpload(bytes, name);
  if (!sniff.ok || !wantSpectrum || (sniff.kind !== 'jcamp' && sniff.kind !== 'csv')) return { sniff };
  return { sniff, parsed: parseSpectrumFile(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8'), sniff.kind) };
}
