/**
 * Prints one plain closing line, "shearfield: N passed, N failed, N skipped",
 * after the default reporter, so that any reader of the CI log (person or
 * tool) sees at a glance how many tests ran.
 */
import type { Reporter, TestModule } from 'vitest/node';

export default class SummaryReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>): void {
    let passed = 0;
    let failed = 0;
    let skipped = 0;
    for (const module of testModules) {
      for (const test of module.children.allTests()) {
        const state = test.result().state;
        if (state === 'passed') passed++;
        else if (state === 'failed') failed++;
        else skipped++;
      }
      if (module.state() === 'failed' && [...module.children.allTests()].length === 0) failed++;
    }
    process.stdout.write(`\nshearfield: ${passed} passed, ${failed} failed, ${skipped} skipped\n`);
  }
}
