import { z } from "zod";

// Runs in the browser before the app's code. zod compiles fast object parsers with `new Function` when eval is
// allowed, and probes for that once; under our nonce-only script policy (proxy.ts) the probe fails harmlessly but
// the browser still reports a CSP violation. Jitless mode skips the probe; parsing a form is fast without it.
z.config({ jitless: true });
