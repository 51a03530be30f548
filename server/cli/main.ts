/**
 * Command-line entry: `npm run cli -- <command> ...` (see commands.ts for the commands).
 */
import { runCli } from './commands';

process.exitCode = runCli(process.argv.slice(2));
