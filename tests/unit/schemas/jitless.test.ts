/**
 * zod is loaded only by pages whose forms use a schema from lib/schemas, so the browser setting that
 * keeps zod from probing for `new Function` (which the content security policy reports) lives in
 * lib/schemas/jitless.ts and must come first in every schema module that uses zod at run time.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const DIR = path.resolve('lib/schemas');

describe('lib/schemas', () => {
  it('every module that imports zod for use imports ./jitless before it', () => {
    const wrong: string[] = [];
    for (const file of fs.readdirSync(DIR).filter((f) => /\.tsx?$/.test(f) && f !== 'jitless.ts')) {
      const source = fs.readFileSync(path.join(DIR, file), 'utf8');
      const zod = source.search(/^import (?!type )[^;]*from 'zod';/m);
      if (zod === -1) continue;
      const jitless = source.search(/^import '\.\/jitless';/m);
      if (jitless === -1 || jitless > zod) wrong.push(file);
    }
    expect(wrong).toEqual([]);
  });
});
