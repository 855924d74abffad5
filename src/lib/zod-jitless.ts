// Imported first by main.tsx, before any schema exists: zod's fast path
// compiles parsers with `new Function`, which the Content-Security-Policy
// forbids (script-src has no 'unsafe-eval'); its probe for that alone shows up
// as a policy violation. Schemas made after this line never try.
import { z } from "zod";

z.config({ jitless: true });
