/** A stored spectrum upload read and parsed (JCAMP-DX or CSV), or a message saying why it cannot be. */
import fs from 'node:fs';
import { uploadPath } from '@/lib/storage';
import { parseSpectrumFile, sniffUpload } from '@/lib/spectrum';

export function loadSpectrum(upload: { storedName: string; originalName: string }) {
  let bytes: Buffer;
  try {
    bytes = fs.readFileSync(uploadPath(upload.storedName));
  } catch {
    return { ok: false as const, message: 'The spectrum file could not be read.' };
  }
  const sniff = sniffUpload(new Uint8Array(bytes), upload.originalName);
  if (sniff.kind !== 'jcamp' && sniff.kind !== 'csv') return { ok: false as const, message: 'The stored file is not a spectrum.' };
  return parseSpectrumFile(bytes.toString('utf8'), sniff.kind);
}
