// Test-run reporter with no expected values (no source needed): lists the ten slowest files.
import type { Reporter, TestModule } from 'vitest/node';

/** After the run, prints the ten test files that took longest (import plus tests and hooks). */
export default class SlowestFilesReporter implements Reporter {
  onTestRunEnd(modules: ReadonlyArray<TestModule>): void {
    const rows = modules
      .map((m) => {
        const d = m.diagnostic();
        return { file: m.relativeModuleId, ms: d.collectDuration + d.duration };
      })
      .sort((a, b) => b.ms - a.ms)
      .slice(0, 10);
    if (rows.length === 0) return;
    const lines = rows.map((r) => `  ${(r.ms / 1000).toFixed(1).padStart(6)} s  ${r.file}`);
    process.stdout.write(`\nslowest test files:\n${lines.join('\n')}\n`);
  }
}
