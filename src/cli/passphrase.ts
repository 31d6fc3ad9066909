// Getting the signing key's passphrase: from KVARBOOK_PASSPHRASE, or asked on the terminal without echo.
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { launchEnvironment } from './launchEnvironment.ts';

export async function readPassphrase(prompt: string, env: NodeJS.ProcessEnv = launchEnvironment()): Promise<string> {
  const fromEnvironment = env.KVARBOOK_PASSPHRASE;
  if (fromEnvironment !== undefined && fromEnvironment !== '') return fromEnvironment;
  const input = process.stdin;
  if (!input.isTTY) {
    throw new StudyFailure([
      {
        code: 'passphrase-missing',
        message: 'a passphrase is needed for the signing key, and there is no terminal to ask on',
        hint: 'set KVARBOOK_PASSPHRASE for this command',
      },
    ]);
  }
  process.stderr.write(prompt);
  input.setRawMode(true);
  input.resume();
  input.setEncoding('utf8');
  return new Promise<string>((resolve, reject) => {
    let typed = '';
    const finish = (error?: Error) => {
      input.setRawMode(false);
      input.pause();
      input.removeListener('data', onData);
      process.stderr.write('\n');
      if (error) reject(error);
      else resolve(typed);
    };
    const onData = (chunk: string) => {
      for (const character of chunk) {
        if (character === '\r' || character === '\n') return finish();
        if (character === '\u0003') return finish(new StudyFailure([{ code: 'passphrase-cancelled', message: 'cancelled' }]));
        if (character === '\u007f' || character === '\b') typed = typed.slice(0, -1);
        else typed += character;
      }
    };
    input.on('data', onData);
  });
}
