// Mocha's spec output, plus the run's counts written as JSON to $SPREADPROOF_COUNTS_FILE so that
// test/run.ts can add up several mocha runs into one closing line.
'use strict';
const fs = require('node:fs');
const Mocha = require('mocha');

class CountReporter extends Mocha.reporters.Spec {
  constructor(runner, options) {
    super(runner, options);
    runner.once(Mocha.Runner.constants.EVENT_RUN_END, () => {
      const file = process.env.SPREADPROOF_COUNTS_FILE;
      if (!file) return;
      const { passes = 0, failures = 0, pending = 0 } = runner.stats ?? {};
      fs.writeFileSync(file, JSON.stringify({ passed: passes, failed: failures, skipped: pending }));
    });
  }
}

module.exports = CountReporter;
