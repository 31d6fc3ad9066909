// The kvarbook command line: parses arguments, calls one command, renders problems once, and picks the exit code.
import { Command, CommanderError, Option } from 'commander';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { installationFacts } from './environment.ts';
import { newCommand, templateNames } from './newCommand.ts';
import { processTerminal, type Terminal } from './terminal.ts';

export const EXIT = { ok: 0, studyFailed: 1, usage: 2 } as const;

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

export function buildProgram(terminal: Terminal, setExit: (code: number) => void): Command {
  const program = new Command('kvarbook')
    .description('Executable reactive-compensation studies: Markdown with TypeScript calculation blocks to a sealed, re-checkable report.')
    .version(installationFacts().kvarbookVersion, '-v, --version')
    .showHelpAfterError('(run kvarbook --help for usage)')
    .exitOverride()
    .configureOutput({ writeErr: (text) => process.stderr.write(text), writeOut: (text) => process.stdout.write(text) });

  program
    .command('run')
    .description('run a study and write build/<id>-r<revision>.html and .results.json')
    .argument('<study>', 'the study file (.study.md)')
    .option('-o, --out <dir>', 'folder for the report files', 'build')
    .option('-s, --set <name=value>', 'override an input for this run, e.g. --set lineLength=280km (repeatable)', collect, [])
    .addOption(new Option('--no-typecheck', 'skip type-checking the blocks (faster while drafting)'))
    .action(async (study: string, options: { out: string; set: string[]; typecheck: boolean }) => {
      // Loaded on demand so that --help and usage errors answer at once.
      const { runCommand } = await import('./runCommand.ts');
      setExit(await runCommand(study, options, terminal));
    });

  program
    .command('new')
    .description('start a new study from a template')
    .argument('<template>', `template name (${templateNames().join(', ')})`)
    .argument('<file>', 'the study file to create')
    .action((template: string, file: string) => {
      setExit(newCommand(template, file, terminal));
    });

  return program;
}

export async function main(argv: readonly string[]): Promise<number> {
  const terminal = processTerminal();
  let exitCode: number = EXIT.ok;
  const program = buildProgram(terminal, (code) => {
    exitCode = code;
  });
  try {
    await program.parseAsync([...argv], { from: 'user' });
    return exitCode;
  } catch (error) {
    if (error instanceof CommanderError) {
      const informational = error.code === 'commander.helpDisplayed' || error.code === 'commander.version' || error.code === 'commander.help';
      return informational ? EXIT.ok : EXIT.usage;
    }
    if (error instanceof StudyFailure) {
      terminal.problems(error.diagnostics);
      return EXIT.studyFailed;
    }
    terminal.problems([{ code: 'internal', message: `kvarbook failed unexpectedly: ${(error as Error).message}`, hint: 'please report this with the study that caused it' }]);
    return EXIT.studyFailed;
  }
}
