import { chmodSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { findChromium } from '../../../src/report/pdf/find-chromium.ts';
import { scratchFolder } from '../../support/cli.ts';

const scratch = scratchFolder('kvarbook-find-chromium-test-');
const fakeBrowser = join(scratch, 'my-chromium');
writeFileSync(fakeBrowser, '#!/bin/sh\n');
chmodSync(fakeBrowser, 0o755);
const notExecutable = join(scratch, 'plain-file');
writeFileSync(notExecutable, '');

describe('findChromium', () => {
  it('uses KVARBOOK_CHROMIUM before the standard locations', () => {
    expect(findChromium({ KVARBOOK_CHROMIUM: fakeBrowser }, ['/usr/bin/chromium'])).toEqual({ path: fakeBrowser });
  });

  it('does not fall back when KVARBOOK_CHROMIUM points at nothing usable', () => {
    const found = findChromium({ KVARBOOK_CHROMIUM: notExecutable }, [fakeBrowser]);
    expect(found).toEqual({ error: expect.stringContaining(`KVARBOOK_CHROMIUM=${notExecutable}`) });
  });

  it('takes the first executable standard location', () => {
    expect(findChromium({}, [join(scratch, 'absent'), fakeBrowser])).toEqual({ path: fakeBrowser });
  });

  it('explains in one line how to install Chromium when none is found', () => {
    const found = findChromium({}, [join(scratch, 'absent-1'), join(scratch, 'absent-2')]);
    if (!('error' in found)) throw new Error('expected an error');
    expect(found.error).not.toContain('\n');
    expect(found.error).toContain('apt-get install -y chromium');
    expect(found.error).toContain('KVARBOOK_CHROMIUM');
  });
});
