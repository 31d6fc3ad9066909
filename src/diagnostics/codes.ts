// The one catalogue of problem codes: every code a diagnostic or a kvarbook error can carry, with its meaning.

/** Each code, kebab-case, and what it means in one line. A code is stable: tests, scripts and studies may branch on it. */
export const DIAGNOSTIC_CODES = {
  // Reading the study file (src/cli)
  'study-not-file': 'the study path names something other than a file',
  'study-unreadable': 'the study file does not exist or cannot be read',
  'study-too-large': 'the study file is larger than a study may be',
  'study-not-utf8': 'the study file is not UTF-8 text',
  'study-binary': 'the study file contains NUL characters',

  // Front matter (src/study)
  'front-matter-missing': 'the study does not start with a front matter block',
  'front-matter-unclosed': 'the front matter has no closing --- line',
  'front-matter-yaml': 'the front matter is not valid YAML',
  'front-matter-flow-comma': 'an unquoted comma inside { } split a value into a key of its own',
  'front-matter-shape': 'the front matter is not a mapping of keys to values',
  'front-matter-unknown-key': 'the front matter has a key kvarbook does not know',
  'front-matter-missing-key': 'a required front matter key is missing',
  'front-matter-type': 'a front matter value has the wrong type',
  'front-matter-range': 'a front matter number is outside its allowed range',
  'front-matter-id': 'the study id is not a usable identifier',
  'front-matter-date': 'the study date is not a calendar date',

  // Inputs and overrides (src/study)
  'input-name': 'an input name is not a usable identifier',
  'input-not-quantity': 'an input value is not a quantity with a unit',
  'input-quantity-unknown': 'an input names a kind of quantity kvarbook does not know',
  'input-unit': 'an input unit cannot be read',
  'input-unit-mismatch': "an input unit does not measure the input's kind of quantity",
  'input-range': "an input's allowed range is malformed",
  'input-out-of-range': 'an input value is outside its allowed range',
  'input-missing-value': 'an input has no value',
  'override-syntax': 'a --set argument is not name=value',
  'override-unknown-input': 'a --set argument names no input of the study',
  'override-unit': 'the unit of a --set value cannot be read',
  'override-unit-mismatch': "the unit of a --set value does not measure the input's quantity",
  'override-out-of-range': "a --set value is outside the input's allowed range",

  // Sensitivity (src/study/sensitivity.ts, src/sensitivity)
  'sensitivity-unknown-input': 'the sensitivity section names an input the study does not declare',
  'sensitivity-range': 'a sensitivity range is malformed: no ends, both a factor and ends, or a low end not below the high end',
  'sensitivity-out-of-range': "a sensitivity range reaches outside the input's own allowed range",
  'sensitivity-unknown-result': 'the sensitivity section names a result or criterion the run never produced',
  'sensitivity-result-not-number': 'the sensitivity section names a result that is not a number',
  'sensitivity-no-plan': '--sensitivity was asked of a study whose front matter declares no sensitivity section',
  'sensitivity-variant-failed': 'the study failed with an input at one end of its sensitivity range',

  // The study body (src/study, src/execute)
  'fence-unclosed': 'a fenced code block has no closing fence',
  'markdown-image-source': 'an image in the prose points outside the report',
  'inline-empty': 'an inline value {{ }} holds no expression',
  'inline-syntax': 'an inline value is not a valid expression',
  'block-case-table': 'caseTable() was given something other than a case table, or an unknown layout',
  'block-option-unknown': 'a calculation block has an option kvarbook does not know',
  'block-syntax': 'a calculation block is not valid TypeScript',
  'block-module-syntax': 'a calculation block uses import or export',
  'block-reserved-name': 'a calculation block declares a name the block API owns',
  'block-redeclared': 'a calculation block declares a name an earlier block declared',

  // The type check (src/execute)
  'typecheck-limit': 'the type check ran past its time or memory limit',
  'type-module-refused': 'the study code refers to another file (import, import type, reference)',

  // Running the blocks (src/execute)
  'time-limit': 'a block, an inline value or the study ran longer than its time limit',
  'memory-limit': 'the calculation process used more memory than its limits allow',
  'child-start': 'the calculation process could not be started',
  'child-exit': 'the calculation process ended while a block ran',
  'child-protocol': 'the calculation process answered out of turn',
  'block-denied': 'a block tried something a study may not do (files, network, processes, code from text)',
  'block-threw': 'a block threw an error of its own',
  'block-constant-reassigned': 'a block assigned to a constant an earlier block declared',
  'block-input-conversion': 'an input cannot be converted to the unit a block asked for',
  'block-unit': 'a unit given to the block API cannot be read',
  'block-digits': 'a number of significant digits is outside what a report can show',
  'block-non-finite': 'a block reported a non-finite number or text that says one',
  'block-output-limit': 'a block, or the study, wrote more output than allowed',
  'block-text-characters': 'a text a block wrote has invisible or control characters or stray spaces',
  'block-result-name': 'result() was called without a name',
  'block-criterion-name': 'criterion() was called without a name',
  'block-result-duplicate': 'a block reported a result name already reported',
  'block-tolerance': 'a result tolerance is not a usable relative tolerance',
  'block-criterion-duplicate': 'a block reported a criterion name already reported',
  'block-criterion-limits': 'a criterion has no usable limits',
  'block-caution-text': 'a caution text is empty or unusable',
  'block-table-rows': 'a table has rows that do not match its columns',
  'block-chart-caption': 'a chart caption is empty or unusable',
  'block-chart-spec': 'a chart specification given to chart() is not an object',
  'inline-undefined': 'an inline value refers to a name no block above it defines',
  'inline-failed': 'an inline value threw an error',
  'inline-type': 'an inline value is of a type that has no written form (an object, null, undefined)',
  'inline-non-finite': 'an inline value is not finite',
  'inline-output-limit': 'the text of an inline value is longer than allowed',
  'inline-text-characters': 'the text of an inline value has invisible or control characters or stray spaces',

  // The solver (src/solver), seen by blocks as SolverDomainError
  'out-of-range': 'a solver input is outside its allowed range or not one of its allowed values',
  'missing-quantity': 'a solver input is missing',
  'not-a-finite-number': 'a solver input is not a finite number',
  'inconsistent-quantities': 'solver inputs contradict one another',
  'no-operating-point': 'the network has no steady operating point for the loading asked (beyond the nose of the curve)',
  'no-convergence': 'an iteration of the solver did not converge',
  'transfer-limit-exceeded': 'the power asked exceeds what the line can transfer',
  'target-unreachable': 'no compensation within the limits given reaches the target',
  'reciprocity-violated': 'a two-port does not satisfy AD - BC = 1',
  'degenerate-network': 'the network is singular (zero impedance, zero length, open everywhere)',
  'non-finite-result': 'a solver result came out NaN or infinite',

  // Charts (src/report/chart)
  'chart-spec': 'a chart specification cannot be drawn',
  'chart-limit': 'drawing a chart ran past its time or memory limit',
  'chart-spec-not-object': 'a chart specification is not an object',
  'chart-spec-invalid': 'a chart specification is not valid Vega-Lite',
  'chart-data-not-inline': 'a chart specification asks for data that is not inline',
  'chart-spec-not-allowed': 'a chart specification uses a feature kvarbook does not draw',
  'chart-render-failed': 'Vega could not draw a chart',
  'chart-input-out-of-range': 'an input to a chart builder is outside what can be drawn',
  'chart-input-empty': 'a chart builder was given no points',
  'chart-input-not-finite': 'a chart builder was given a non-finite number',

  // The report (src/report)
  'report-too-large': 'the report would be larger than a report may be',
  'pdf-invalid-option': 'a PDF printing option is outside its allowed values',
  'pdf-browser-launch-failed': 'Chromium could not be started',
  'pdf-browser-timeout': 'Chromium did not finish printing in time',
  'pdf-print-failed': 'Chromium failed to print the report',
  'pdf-read-failed': 'a PDF or its attachments cannot be read',
  'pdf-no-chromium': 'a PDF was asked for, but no Chromium is configured or installed',
  'pdf-no-report': 'a PDF carries no sealed report',
  'pdf-report-ambiguous': 'a PDF carries more than one sealed report',

  // Seals and signing keys (src/seal)
  'seal-not-canonical-json': 'a sealed document is not canonical JSON',
  'seal-passphrase-too-short': 'a new passphrase is shorter than allowed',
  'seal-wrong-passphrase': 'the passphrase does not unlock the signing key',
  'seal-malformed-key': 'a key file is not a key kvarbook made',
  'seal-wrong-key-type': 'a key is not an Ed25519 key',
  'seal-key-identity-mismatch': 'a key does not belong to the identity stored with it',
  'seal-invalid-identity-field': "a field of an engineer's identity is unusable",
  'seal-key-exists': 'a signing key for this identity exists already',
  'seal-key-not-found': 'the signing key asked for is not in the keys folder',
  'seal-no-default-key': 'the keys folder holds no signing key',
  'seal-ambiguous-default-key': 'the keys folder holds several signing keys and none is the default',
  'seal-invalid-seal-subject': 'what would be sealed is malformed',
  'seal-invalid-tolerance': 'a tolerance is not a usable relative tolerance',
  'seal-invalid-check-record': 'a check record is malformed',
  'seal-not-the-engineer': 'the signing key belongs to someone other than the engineer the study names',
  'seal-needs-typecheck': '--seal was asked together with --no-typecheck',

  // The command line (src/cli)
  'report-missing': 'the report to check does not exist',
  'diff-not-report': 'a file handed to diff is not a kvarbook report',
  'diff-no-figures': 'a report handed to diff carries no figures to compare',
  'diff-figures-malformed': "a report's embedded results or seal cannot be read",
  'diff-figures-mismatch': 'the results beside a report are not those of its study',
  'diff-page-exists': 'the file asked for the diff page exists already',
  'record-malformed': 'the calculation process sent a malformed record',
  'check-exists': 'a check record for this report exists already',
  'check-own-seal': 'the checker tried to counter-sign a report they sealed themselves',
  'check-unsignable': 'an outcome that did not verify cannot be counter-signed',
  'sealed-report-exists': 'a sealed report of the same id and revision exists already',
  'variant-name': 'a --variant name is not a plain word a file name can carry',
  'output-folder-link': 'the output folder holds a link kvarbook did not make',
  'output-folder-entry': 'the output folder holds something kvarbook does not keep there',
  'passphrase-missing': 'a passphrase is needed, but there is no terminal and KVARBOOK_PASSPHRASE is not set',
  'passphrase-cancelled': 'the passphrase prompt was cancelled',
  'template-missing': 'there is no template of that name',
  'new-exists': 'the file a new study would be written to exists already',
  'new-unwritable': 'the new study cannot be written',
  'preview-port-unavailable': 'the live preview cannot listen on the port asked for (taken, or not allowed)',
  'preview-watch-failed': 'the live preview cannot watch the study file for saves',

  // The archive (src/archive, src/cli/archiveCommand.ts)
  'archive-refused': 'a report was not archived: it is not sealed, was changed since sealing, or its signer is not trusted',
  'archive-not-found': 'no archived report has that study id (and revision)',
  'archive-export-exists': 'the folder an archived report would be exported to already holds one of its files',
  'archive-index-unreadable': 'the archive index cannot be opened or is not an archive index',
  internal: 'kvarbook failed unexpectedly (a defect to report)',
} as const satisfies Record<string, string>;

/** TypeScript's own diagnostics keep the compiler's number, e.g. `type-2322`. */
export type TypeCheckCode = `type-${number}`;

export type DiagnosticCode = keyof typeof DIAGNOSTIC_CODES | TypeCheckCode;

export function isDiagnosticCode(text: string): text is DiagnosticCode {
  return Object.hasOwn(DIAGNOSTIC_CODES, text) || /^type-\d+$/.test(text);
}

/** The codes of one group, e.g. `CodesStartingWith<'seal-'>`, for a class that may raise only those. */
export type CodesStartingWith<Prefix extends string> = Extract<DiagnosticCode, `${Prefix}${string}`>;
