/**
 * Rhobook's command line: `npm run --silent cli -- fit FILE.csv --json ...` (see lib/cli/fit.ts).
 * Exit codes: 0 done; 2 bad command line or bad input (the message names the row and problem);
 * 3 some segments failed (each named with its reason; the others are fitted and printed);
 * 1 any other unexpected failure.
 */
import { CliInputError, FIT_USAGE, runFit, type CliIo } from './fit';

const USAGE = `Rhobook command line.\n\n${FIT_USAGE}`;

/** Runs the CLI on the arguments after the program name; resolves with the exit code. */
export async function main(argv: string[], io: CliIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (command === 'fit') return await runFit(rest, io);
    if (command === undefined || command === 'help' || command === '--help' || command === '-h') {
      io.out(USAGE);
      return command === undefined ? 2 : 0;
    }
    throw new CliInputError(`Unknown command "${command}". The only command is fit.\n\n${USAGE}`);
  } catch (err) {
    if (err instanceof CliInputError) {
      io.err(err.message);
      return 2;
    }
    io.err(`Unexpected failure: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`);
    return 1;
  }
}

const invokedDirectly = process.argv[1] !== undefined && /lib[\\/]cli[\\/]index\.[cm]?[jt]s$/.test(process.argv[1]);
if (invokedDirectly) {
  const code = await main(process.argv.slice(2), {
    out: (text) => process.stdout.write(text + '\n'),
    err: (text) => process.stderr.write(text + '\n'),
  });
  process.exitCode = code;
}
