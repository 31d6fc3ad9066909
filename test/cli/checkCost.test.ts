import { chmodSync, existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';

const study = studyText({
  inputs: '  lineLength: 320 km',
  body: '# Charging\n\n```ts\nconst chargingMvar = 0.4 * inputs.lineLength.in("km");\nresult("Charging", chargingMvar, { unit: "Mvar" });\n```\n',
});

describe('kvarbook check of an HTML report', () => {
  const folder = scratchFolder('kvarbook-check-cost-');
  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it('re-runs the study and prints no PDF', { timeout: 120_000 }, () => {
    const env = { KVARBOOK_HOME: join(folder, 'home'), KVARBOOK_PASSPHRASE: 'a long enough passphrase', KVARBOOK_CACHE: join(folder, 'cache') };
    writeFileSync(join(folder, 'line.study.md'), study);
    expect(kvarbook(['key', 'new', '--name', 'Test Engineer', '--licence', 'T-0', '--jurisdiction', 'Testland'], folder, env).status).toBe(0);
    mkdirSync(join(folder, 'home', 'trusted'), { recursive: true });
    expect(kvarbook(['key', 'show', '--out', join(folder, 'home', 'trusted', 'engineer.json')], folder, env).status).toBe(0);
    expect(kvarbook(['run', 'line.study.md', '--seal'], folder, env).status).toBe(0);
    // A browser that only leaves a mark: any print the check started would show.
    const marker = join(folder, 'browser-started');
    const browser = join(folder, 'browser.sh');
    writeFileSync(browser, `#!/bin/sh\ntouch ${JSON.stringify(marker)}\nexit 1\n`);
    chmodSync(browser, 0o755);
    const check = kvarbook(['check', 'build/TEST-1-r1.html'], folder, { ...env, KVARBOOK_CHROMIUM: browser });
    expect(check.stdout).toContain('verdict: VERIFIED');
    expect(check.status).toBe(0);
    expect(existsSync(marker)).toBe(false);
  });
});
