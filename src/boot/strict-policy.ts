import { z } from 'zod';

// Zod compiles fast object parsers with `new Function` when it may; the content security policy
// (script-src 'self', no 'unsafe-eval') forbids that, and even zod's try-and-catch probe is
// reported as a violation. This module is imported first by main.ts, before any schema parses.
z.config({ jitless: true });
