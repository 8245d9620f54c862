// `npm run bench`: prints throughput, latency and memory figures. Targets live in the issues,
// not in timed tests. Run one part with `npm run bench -- <name>`.
interface BenchPart {
  readonly name: string;
  run(): Promise<void>;
}

const parts: BenchPart[] = [
  // Each part registers itself here with one line.
  require('./csv').csvBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./tables').tablesBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./distribution').distributionBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./postgres').postgresBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./distributed').distributedBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./exact').exactBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./extension').extensionBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./activation').activationBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./tabular').xlsxBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./tabular').parquetBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./fragility').fragilityBench, // eslint-disable-line @typescript-eslint/no-require-imports
  require('./hardening').hardeningBench, // eslint-disable-line @typescript-eslint/no-require-imports
];

async function main(): Promise<void> {
  const only = process.argv.slice(2);
  for (const part of parts) {
    if (only.length > 0 && !only.includes(part.name)) continue;
    console.log(`\n== ${part.name} ==`);
    await part.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
