#!/usr/bin/env node
import('../dist/cli.mjs').then((m) => m.main(process.argv)).catch((err) => {
  process.stderr.write(`loopclose: internal error: ${err && err.message ? err.message : err}\n` +
    'The build in dist/ may be missing: run `npm ci` (or `npm run build`) in the project folder.\n');
  process.exit(1);
});
