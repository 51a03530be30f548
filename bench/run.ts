/**
 * Benchmark runner (`npm run bench`): runs every listed section in order and prints its figures.
 * To add a section, export a BenchSection[] from a file in bench/ and append it to SECTIONS.
 */
import { batchSections } from './batches';
import { distributedSections } from './distributed';
import { engineSections, type BenchSection } from './engine';
import { estimateSections } from './estimate';
import { exploreSections } from './explore';
import { gofLoadSections } from './gofLoad';
import { refitSections } from './refits';
import { webSections } from './web';

const SECTIONS: BenchSection[] = [...engineSections, ...batchSections, ...distributedSections, ...estimateSections, ...exploreSections, ...webSections, ...gofLoadSections, ...refitSections];

async function main(): Promise<void> {
  const only = process.argv.slice(2).join(' ').toLowerCase();
  const t0 = performance.now();
  console.log(`Wavefit benchmarks  (node ${process.version}, ${new Date().toISOString()})`);
  for (const section of SECTIONS) {
    if (only && !section.name.toLowerCase().includes(only)) continue;
    console.log(`\n## ${section.name}`);
    const s0 = performance.now();
    await section.run((line) => console.log(line));
    console.log(`(${((performance.now() - s0) / 1000).toFixed(1)} s)`);
  }
  console.log(`\ntotal ${((performance.now() - t0) / 1000).toFixed(1)} s`);
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
