// Imported first by main.tsx. Zod compiles fast parsers with `new Function` when the page allows
// it, and probes for that on the first parse; under the server's Content Security Policy (no
// 'unsafe-eval') the probe is reported as a policy violation even though it is caught. Without
// code generation, zod parses the same way, by interpretation.
import { z } from "zod";

z.config({ jitless: true });
