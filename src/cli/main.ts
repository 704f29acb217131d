/**
 * The `qpoint` command: the same core as the editor, for terminals and CI.
 * Exit codes (design §5): 0 no errors, 1 error findings, 2 unreadable input or bad command line.
 */
import { parseCommandLine } from './args';
import { USAGE } from './usage';
import { runCheck } from './check';
import { runFix } from './fix';
import { runReport } from './report';
import { runSweep } from './sweep';
import { VERSION } from './version';

/** The exit code; `report` answers later (its schematics are laid out asynchronously). */
function main(argv: string[]): number | Promise<number> {
  const parsed = parseCommandLine(argv);
  if (!parsed.ok) {
    process.stderr.write(`qpoint: ${parsed.error}\n(see qpoint --help)\n`);
    return 2;
  }
  const c = parsed.command;
  switch (c.cmd) {
    case 'help': process.stdout.write(USAGE); return 0;
    case 'version': process.stdout.write(`qpoint ${VERSION}\n`); return 0;
    case 'check': return runCheck(c);
    case 'fix': return runFix(c);
    case 'report': return runReport(c);
    case 'sweep': return runSweep(c);
  }
}

// `qpoint check … | head` closes the pipe early: that is not an error worth a stack trace.
process.stdout.on('error', (err: NodeJS.ErrnoException) => {
  if (err.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw err;
});

// Only a defect in qpoint lands here; say so plainly instead of a stack trace.
const internalError = (err: unknown): void => {
  process.stderr.write(`qpoint: internal error: ${(err as Error).message}\n`);
  process.exitCode = 2;
};

try {
  const code = main(process.argv.slice(2));
  if (typeof code === 'number') process.exitCode = code;
  else code.then((c) => { process.exitCode = c; }, internalError);
} catch (err) {
  internalError(err);
}
