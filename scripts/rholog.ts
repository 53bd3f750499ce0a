/**
 * The rholog command: one entry for the command-line tools.
 *
 *   rholog analyze FILE... [options]   reflections and distances from TDR trace CSV files
 *   rholog locate [options]            a best location from several measurements
 *
 * Each subcommand takes the same options as `npm run analyze` / `npm run locate`
 * (`rholog analyze --help`).
 */
const USAGE = `usage: rholog analyze FILE... [options]
       rholog locate [options]
       rholog <analyze|locate> --help`;

// Each subcommand is loaded only when it is asked for (the build turns these into synchronous requires).
const commands: Record<string, () => Promise<unknown>> = {
  analyze: () => import('./analyze.js'),
  locate: () => import('./locate.js'),
};

async function main() {
  const sub = process.argv[2];
  if (sub === undefined || sub === '--help' || sub === '-h') {
    process.stdout.write(`${USAGE}\n`);
    if (sub === undefined) process.exitCode = 2;
    return;
  }
  const target = commands[sub];
  if (!target) {
    process.stderr.write(`rholog: unknown command '${sub}' (expected analyze or locate)\n`);
    process.exitCode = 2;
    return;
  }
  // The subcommand reads its options from process.argv, as when it runs alone.
  process.argv.splice(2, 1);
  await target();
}

export {};

main().catch((err: unknown) => {
  process.stderr.write(`rholog: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exitCode = 1;
});
