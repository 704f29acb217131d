export const USAGE = `qpoint — bias checks for current mirrors and bias networks

usage:
  qpoint check FILE... [--format text|json|sarif] [--corners] [--mc N] [--seed S]
  qpoint fix FILE [--apply] [--dry-run] [--corners]
  qpoint report FILE --html OUT.html [--mc N] [--seed S]
  qpoint sweep FILE --mirror NAME --vout FROM:TO:STEP [--csv]
  qpoint --help | --version

FILE is a *.bias.yaml, *.bias.yml or *.bias.json spec; '-' reads standard input.
A spec past 512 KB is refused (too-large) as soon as reading passes the limit.
--mc N   Monte Carlo samples per output, 1 to 10000000

check    solve every mirror, print each mirror's figures and the findings
         (file:line:col: severity code: message), or JSON / SARIF 2.1.0
fix      apply the preferred fix of every finding, re-check, repeat while errors drop;
         without --apply (or with --dry-run) print the change as a unified diff;
         --corners also fixes corner findings, each fix verified at every corner;
         --apply replaces FILE through a temporary file beside it, and only if FILE
         still holds what was read (an edit saved meanwhile is kept, nothing written)
report   write one self-contained HTML page with the tables, plots and corners
         (and a Monte Carlo histogram per output with --mc); never over FILE itself;
         readable without JavaScript, stamped with version, date and input hash;
         exits 0 once written
sweep    print Iout and Rout of one mirror output across a range of output voltages

exit codes: 0 no errors (warnings allowed), 1 findings of severity error,
            2 unreadable or unparsable input, or a wrong command line

Figures are first-order hand analysis: confirm with transistor-level simulation on the
foundry's models and corners before committing a design.
`;
