/**
 * Imported (for its effect only) by every schema module in this folder, before zod itself.
 * Zod compiles object parsers with `new Function` where it may, and probes for that ability the
 * first time it parses; under Oscillab's content security policy (no 'unsafe-eval') the probe fails
 * harmlessly but the browser reports a policy violation. In the browser zod is therefore told not to
 * try, here, before any schema exists: only pages whose forms use a schema load zod, and all of them
 * get this setting first. (A named import, not the `z` namespace, so the bundler keeps only what the
 * schemas use.)
 */
import { config } from 'zod';

if (typeof window !== 'undefined') config({ jitless: true });
