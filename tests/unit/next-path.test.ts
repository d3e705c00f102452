import { describe, expect, it } from 'vitest';
import { safeNextPath } from '@/lib/next-path';

// Open-redirect guard (common practice: follow only same-origin relative paths after sign-in).
describe('safeNextPath', () => {
  it('keeps a path on this site, with its query', () => {
    expect(safeNextPath('/student/practicals/3')).toBe('/student/practicals/3');
    expect(safeNextPath('/statistics/2?cohortId=4')).toBe('/statistics/2?cohortId=4');
  });
  it('refuses other hosts and odd forms', () => {
    for (const bad of [
      '//evil.example/x',
      '/\\evil.example',
      'https://evil.example',
      'javascript:alert(1)',
      '',
      null,
      '/a\nb',
      '/signin',
      '/api/auth/signout',
    ]) {
      expect(safeNextPath(bad as string | null)).toBeNull();
    }
  });
});
