// Benchmark runner: prints figures, asserts nothing (no expected values, so no sources needed).
/**
 * `npm run bench`: prints speed and memory figures (not a test; machines are noisy, so each
 * section compares against a bare baseline measured in the same run and prints the ratio).
 * Run one section: `npm run bench -- <name>`.
 */
import { sections } from './sections.js';

const only = process.argv.slice(2);
for (const section of sections) {
  if (only.length > 0 && !only.includes(section.name)) continue;
  console.log(`\n== ${section.name}: ${section.title}`);
  const t0 = performance.now();
  try {
    await section.run();
  } catch (err) {
    console.log(`   section failed: ${(err as Error).stack ?? String(err)}`);
    process.exitCode = 1;
  }
  console.log(`   (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
}
