import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { exampleReport } from '../../../scripts/spectrum-example';

describe('lib/spectrum/README.md worked example', () => {
  it('is the output of scripts/spectrum-example.ts', () => {
    const readme = readFileSync(path.resolve(__dirname, '../../../lib/spectrum/README.md'), 'utf8');
    const block = /<!-- example:start -->\n```text\n([\s\S]*?)\n```\n<!-- example:end -->/.exec(readme);
    expect(block).not.toBeNull();
    expect(block![1]).toBe(exampleReport());
  });
});
