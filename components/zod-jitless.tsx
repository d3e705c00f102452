'use client';
import { z } from 'zod';

/**
 * Zod compiles object parsers with `new Function` where it may, and probes for that ability once.
 * Under Oscillab's content security policy (no 'unsafe-eval') the probe fails harmlessly but the
 * browser reports it as a policy violation on every page with a form; in the browser we therefore
 * tell zod not to try. Rendered once by the root layout, so it runs before any form parses input.
 */
if (typeof window !== 'undefined') z.config({ jitless: true });

export function ZodJitless() {
  return null;
}
