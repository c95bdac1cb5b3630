#!/usr/bin/env node
// The `sieve` command (package.json "bin"): runs cli/sieve.ts through tsx, which the app uses too.
import { register } from "tsx/esm/api";

register();
const { main } = await import("../cli/sieve.ts");
process.exitCode = await main(process.argv.slice(2));
