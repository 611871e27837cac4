// Imported first by every schema module that client components use. zod
// compiles object schemas with `new Function` after probing whether eval is
// allowed; under our Content-Security-Policy (no 'unsafe-eval', proxy.ts) the
// probe itself is reported as a violation, so in the browser zod runs without
// compiling. The server keeps the faster compiled path.
import { z } from "zod";

if (typeof window !== "undefined") z.config({ jitless: true });
