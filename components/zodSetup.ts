import { z } from 'zod';

/**
 * zod compiles fast object validators with `new Function` and, to know
 * whether it may, probes `new Function("")` when each object schema is
 * built. The app's Content-Security-Policy forbids eval, so the probe is a
 * reported violation. This runs before any schema is built (it is the first
 * import of the app's entry, `index.ts`): validate without compiling and
 * never probe.
 */
z.config({ jitless: true });
