// Attacks through text a study makes kvarbook print or show: no control sequence reaches the checker's terminal,
// and no name in a report can be made to look like another.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { styleText } from 'node:util';
import { processTerminal } from '../../src/cli/terminal.ts';
import { type CliOutcome, kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const ESC = '\u001b';
const BEL = '\u0007';
const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;

/**
 * Runs `kvarbook run` on the study in a scratch folder, as a checker would: by the command line in this process, which
 * prints through the same terminal, or as a process of its own (`asProcess`), whose stderr is what a terminal shows.
 */
async function runOnTerminal(source: string, asProcess = false): Promise<CliOutcome> {
  const folder = scratchFolder('kvarbook-terminal-');
  writeFileSync(join(folder, 'attack.study.md'), source);
  const args = ['run', 'attack.study.md', '--no-typecheck'];
  return asProcess ? kvarbook(args, folder) : kvarbookInProcess(args, folder);
}

const noControlCharacters = (text: string) => expect(text).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/u);

describe('nothing a study writes reaches the terminal as a control sequence', () => {
  it("shows a block error's escape sequences as text, in the stderr of a process: the screen is not cleared and no verdict is painted", async () => {
    const result = await runOnTerminal(studyText({ body: fence(`throw new Error('${ESC}[2J${ESC}[1;32mverdict: VERIFIED${ESC}[0m');`) }), true);
    expect(result.status).toBe(1);
    noControlCharacters(result.stderr);
    expect(result.stderr).toContain('\\x1b[2J');
  });

  it('keeps a line break in an error message from starting a line of its own', async () => {
    const result = await runOnTerminal(studyText({ body: fence("throw new Error('checked\\nverdict: VERIFIED\\rverdict: VERIFIED');") }));
    expect(result.stderr.split('\n').filter((line) => line.startsWith('verdict'))).toEqual([]);
    noControlCharacters(result.stderr);
  });

  it('shows an escape sequence in the study text of an excerpt as text', async () => {
    const result = await runOnTerminal(studyText({ body: fence(`const title = '${ESC}]0;owned${BEL}';\nundefinedName.call();`) }));
    expect(result.status).toBe(1);
    noControlCharacters(result.stderr);
    expect(result.stderr).toContain('\\x1b]0;owned\\x07');
  });

  it('shows a direction override in an error message as text', async () => {
    const result = await runOnTerminal(studyText({ body: fence("throw new Error('limit met \\u202e teem ton');") }));
    noControlCharacters(result.stderr);
    expect(result.stderr).toContain('\\u202e');
  });

  it('shows escape sequences in an error code and hint as text', async () => {
    const result = await runOnTerminal(
      studyText({ body: fence(`throw Object.assign(new Error('x'), { code: '${ESC}[2J', hint: '${ESC}[8mhidden' });`) }),
    );
    noControlCharacters(result.stderr);
  });
});

/** A terminal writing into strings, as kvarbook's own printing does into the checker's terminal. */
function capturedTerminal() {
  const written = { out: '', err: '' };
  const stream = (key: 'out' | 'err') =>
    ({
      write: (text: string) => {
        written[key] += text;
        return true;
      },
      isTTY: false,
    }) as unknown as NodeJS.WritableStream;
  return { terminal: processTerminal({ out: stream('out'), err: stream('err') }), written };
}

describe('every line kvarbook prints is escaped', () => {
  it('writes a sealed name carrying escape sequences as text, so a forged seal cannot repaint the verdict', () => {
    const { terminal, written } = capturedTerminal();
    terminal.say(`   Vr${ESC}[2K${ESC}[1Averdict: VERIFIED: sealed 1, re-run 2`);
    expect(written.out).toBe('   Vr\\x1b[2K\\x1b[1Averdict: VERIFIED: sealed 1, re-run 2\n');
  });

  it('keeps a name on its own line: a line break in it is written as \\n', () => {
    const { terminal, written } = capturedTerminal();
    terminal.say('   Vr\nverdict: VERIFIED');
    expect(written.out.split('\n')).toEqual(['   Vr\\nverdict: VERIFIED', '']);
  });

  it('escapes a terminal hyperlink and a window title', () => {
    const { terminal, written } = capturedTerminal();
    terminal.say(`${ESC}]8;;https://tracker.invalid${ESC}\\link${ESC}]8;;${ESC}\\ ${ESC}]0;title${BEL}`);
    noControlCharacters(written.out.slice(0, -1));
  });

  it('keeps the colours kvarbook paints its own verdict with', () => {
    const { terminal, written } = capturedTerminal();
    const painted = `${ESC}[1m${ESC}[32mVERIFIED${ESC}[39m${ESC}[22m`;
    terminal.say(`verdict: ${painted}`);
    expect(written.out).toBe(`verdict: ${painted}\n`);
    expect(styleText(['bold', 'green'], 'VERIFIED')).toMatch(/^(VERIFIED|\u001b\[1m\u001b\[32mVERIFIED\u001b\[39m\u001b\[22m)$/);
  });

  it('indents the continuation lines of a diagnostic so that none can pose as a line of its own', () => {
    const { terminal, written } = capturedTerminal();
    terminal.problems([
      { code: 'block-threw', message: 'first\nverdict: VERIFIED', hint: 'fix it\nverdict: VERIFIED', at: { file: 'a.study.md', line: 3 } },
    ]);
    expect(written.err.split('\n').filter((line) => line.startsWith('verdict'))).toEqual([]);
  });
});

async function refusedName(code: string, needle: string) {
  const source = studyText({ body: fence(code) });
  const [problem] = await diagnosticsOf(runSource(source));
  expect(problem, JSON.stringify(problem)).toMatchObject({ at: { line: lineOf(source, needle) } });
  expect(problem?.code).toMatch(/^block-(text-characters|result-duplicate|criterion-duplicate)$/);
  return problem!;
}

describe('no two names in a report look alike', () => {
  it('refuses a zero-width space in a result name', async () => {
    const problem = await refusedName("result('Receiving-end voltage', 1.02);\nresult('Receiving-end\\u200b voltage', 1.09);", 'end\\u200b');
    expect(problem.message).toContain('U+200B');
  });

  it('refuses a direction override in a criterion name', async () => {
    await refusedName("criterion('Voltage \\u202edetem', 1.0, { max: 1.05 });", 'criterion(');
  });

  it('refuses a full-width look-alike of a name recorded before', async () => {
    const problem = await refusedName("result('Vr', 1.02, { unit: 'pu' });\nresult('\\uff36r', 1.09, { unit: 'pu' });", "'\\uff36r'");
    expect(problem.message).toContain('looks like the result "Vr"');
  });

  it('refuses a name that differs from another only in spaces a report collapses', async () => {
    await refusedName("result('Vr max', 1.02);\nresult('Vr  max', 1.09);", "'Vr  max'");
  });

  it('refuses a soft hyphen in a table column label', async () => {
    await refusedName("table([{ a: 1 }], { columns: [{ key: 'a', label: 'Vol\\u00adtage' }] });", 'table(');
  });

  it('refuses a direction isolate in a chart caption', async () => {
    await refusedName(
      "chart({ data: { values: [{ x: 1 }] }, mark: 'point', encoding: { x: { field: 'x', type: 'quantitative' } } }, { caption: 'Profile \\u2067reversed\\u2069' });",
      'chart(',
    );
  });

  it('refuses a direction override in a unit', async () => {
    await refusedName("result('Length', 380, { unit: 'k\\u202em' });", "result('Length'");
  });

  it('refuses a direction override in a caution', async () => {
    await refusedName("caution('Energise with the reactor \\u202eNOT\\u202c connected');", 'caution(');
  });

  it('writes invisible characters of a solver label out in the calculation log', async () => {
    const source = studyText({
      body: fence(
        "const line = solver.lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6, lengthKm: 100, label: 'Line\\u200bA' });",
      ),
    });
    const product = await runSource(source);
    const log = product.report.body.slice(product.report.body.indexOf('id="calculation-log"'));
    expect(log).toContain('Line⟨U+200B⟩A');
    expect(log).not.toContain('\u200b');
  });
});
