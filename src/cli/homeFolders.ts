// Where kvarbook keeps a user's signing keys and trusted identities (resolved once, at the edge).
import { homedir } from 'node:os';
import { join } from 'node:path';
import { launchEnvironment } from './launchEnvironment.ts';

export interface HomeFolders {
  keys: string;
  trusted: string;
}

/** KVARBOOK_HOME, else $XDG_CONFIG_HOME/kvarbook, else ~/.config/kvarbook. */
export function homeFolders(env: NodeJS.ProcessEnv = launchEnvironment()): HomeFolders {
  const home = env.KVARBOOK_HOME ?? join(env.XDG_CONFIG_HOME ?? join(homedir(), '.config'), 'kvarbook');
  return { keys: join(home, 'keys'), trusted: join(home, 'trusted') };
}
