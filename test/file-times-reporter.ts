/**
 * Writes how long each test file took, from the moment vitest queued it
 * until it ended (its imports, hooks and tests), longest first, to
 * test-results/file-times.json after every run. This is the yardstick for
 * the long-first list in test/long-first-sequencer.ts: after a full run
 * (npm test), the files at the top of that file belong at the top of the
 * list. Nothing is printed.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { Reporter, TestModule, Vitest } from 'vitest/node';

export default class FileTimesReporter implements Reporter {
  private root = process.cwd();
  private queued = new Map<string, number>();
  private rows: { file: string; seconds: number; tests: number; state: string }[] = [];
  private started = 0;

  onInit(ctx: Vitest): void {
    this.root = ctx.config.root;
  }

  onTestRunStart(): void {
    this.started = Date.now();
    this.queued.clear();
    this.rows = [];
  }

  onTestModuleQueued(m: TestModule): void {
    this.queued.set(m.moduleId, Date.now());
  }

  onTestModuleEnd(m: TestModule): void {
    const from = this.queued.get(m.moduleId) ?? this.started;
    const file = relative(this.root, m.moduleId).replaceAll('\\', '/');
    this.rows.push({ file, seconds: (Date.now() - from) / 1000, tests: [...m.children.allTests()].length, state: m.state() });
  }

  onTestRunEnd(): void {
    this.rows.sort((a, b) => b.seconds - a.seconds);
    const dir = join(this.root, 'test-results');
    mkdirSync(dir, { recursive: true });
    const run = { seconds: (Date.now() - this.started) / 1000, files: this.rows };
    writeFileSync(join(dir, 'file-times.json'), `${JSON.stringify(run, null, 1)}\n`);
  }
}
