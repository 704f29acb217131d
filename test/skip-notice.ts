/**
 * No suite is skipped in silence: with QPOINT_SKIP_WORKBENCH=1 (a machine that cannot run the
 * real workbench) the run says so before the suites and again after the summary.
 */
const NOTICE = '\n*** QPOINT_SKIP_WORKBENCH=1: the real VS Code workbench suite (test/workbench) is SKIPPED in this run ***\n';

export default function setup(): (() => void) | undefined {
  if (process.env.QPOINT_SKIP_WORKBENCH !== '1') return undefined;
  process.stdout.write(NOTICE);
  return () => { process.stdout.write(NOTICE); };
}
