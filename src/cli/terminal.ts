// What the command line prints: results on stdout, diagnostics on stderr, a progress line only on a terminal.
import { type Diagnostic, formatDiagnostic } from '../diagnostics/diagnostic.ts';

export interface Terminal {
  say(line: string): void;
  progress(line: string): void;
  progressDone(): void;
  problems(diagnostics: readonly Diagnostic[]): void;
}

export function processTerminal(): Terminal {
  const interactive = Boolean(process.stderr.isTTY);
  let showing = false;
  const clear = () => {
    if (showing) process.stderr.write('\r\x1b[2K');
    showing = false;
  };
  return {
    say: (line) => {
      clear();
      process.stdout.write(`${line}\n`);
    },
    progress: (line) => {
      if (!interactive) return;
      clear();
      process.stderr.write(`kvarbook: ${line}`);
      showing = true;
    },
    progressDone: clear,
    problems: (diagnostics) => {
      clear();
      for (const diagnostic of diagnostics) process.stderr.write(`${formatDiagnostic(diagnostic)}\n`);
    },
  };
}
