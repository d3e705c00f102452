import 'server-only';
import path from 'node:path';
import fs from 'node:fs';

/** Uploads and generated feedback live outside public/, by default under data/. */
export function uploadDir(): string {
  const dir = process.env.UPLOAD_DIR || path.join(/*turbopackIgnore: true*/ process.cwd(), 'data', 'uploads');
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

export function feedbackDir(): string {
  const dir = path.join(/*turbopackIgnore: true*/ uploadDir(), 'feedback');
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

const SAFE_NAME = /^[a-f0-9]{32}(\.[a-z]{2,5})?$/;

/** A name Oscillab gives a stored file (random hex and an extension, formidable's `.part` included). */
export const isStoredName = (name: string) => SAFE_NAME.test(name);

/** Paths come only from stored random names, never from what a user sent. */
export function uploadPath(storedName: string): string {
  if (!SAFE_NAME.test(storedName)) throw new Error('Bad stored file name');
  return path.join(/*turbopackIgnore: true*/ uploadDir(), storedName);
}

export function feedbackPath(storedName: string): string {
  if (!SAFE_NAME.test(storedName)) throw new Error('Bad stored file name');
  return path.join(/*turbopackIgnore: true*/ feedbackDir(), storedName);
}
