// Where kvarbook keeps a user's signing keys, trusted identities and archive (resolved once, at the edge).
import { homedir } from 'node:os';
import { join } from 'node:path';
import { launchEnvironment } from './launchEnvironment.ts';

export interface HomeFolders {
  keys: string;
  trusted: string;
  archive: string;
}

/**
 * Keys and trust: KVARBOOK_HOME, else $XDG_CONFIG_HOME/kvarbook, else ~/.config/kvarbook. The archive is data, not
 * settings: KVARBOOK_ARCHIVE, else <KVARBOOK_HOME>/archive, else $XDG_DATA_HOME/kvarbook/archive, else ~/.local/share/kvarbook/archive.
 */
export function homeFolders(env: NodeJS.ProcessEnv = launchEnvironment()): HomeFolders {
  const home = env.KVARBOOK_HOME ?? join(env.XDG_CONFIG_HOME ?? join(homedir(), '.config'), 'kvarbook');
  const archive =
    env.KVARBOOK_ARCHIVE ??
    (env.KVARBOOK_HOME ? join(env.KVARBOOK_HOME, 'archive') : join(env.XDG_DATA_HOME ?? join(homedir(), '.local', 'share'), 'kvarbook', 'archive'));
  return { keys: join(home, 'keys'), trusted: join(home, 'trusted'), archive };
}
