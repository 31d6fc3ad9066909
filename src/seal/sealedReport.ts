// A sealed HTML report: the seal and check records in the seal slot, and reading them back byte for byte.
import { SEAL_SLOT_END, SEAL_SLOT_START, assembleReport, type ReportParts } from '../report/html.ts';
import type { ResultsDocument } from '../report/studyRun.ts';
import { formatLimits, formatQuantity, formatStated } from '../blocks/format.ts';
import { jsonScript, jsonScriptTexts } from '../report/embed.ts';
import { escapeHtml, hashHtml } from '../report/escape.ts';
import { serializeCheckRecord, type CheckRecord } from './checkRecord.ts';
import { serializeEnvelope, type SealEnvelope, type SealSubject } from './manifest.ts';
import { sha256Hex } from './digest.ts';
import { sensitivityFigures } from '../sensitivity/outcome.ts';

const SEAL_SCRIPT_OPEN = '<script type="application/json" id="kvarbook-seal">';
const CHECK_SCRIPT_OPEN = '<script type="application/json" class="kvarbook-check">';

/** The bytes a seal's body hash covers: the whole report except its seal slot. */
export function reportBody(parts: ReportParts): string {
  return parts.head + parts.body;
}

export function reportBodySha256(parts: ReportParts): string {
  return sha256Hex(reportBody(parts));
}

/** What the engineer signs, gathered from the run's results document. */
export function sealSubject(results: ResultsDocument, bodySha256: string): SealSubject {
  const effectiveInputs: SealSubject['effectiveInputs'] = {};
  for (const input of results.inputs) effectiveInputs[input.name] = { value: input.value, unit: input.unit, source: input.source };
  return {
    studyId: results.study.id,
    revision: String(results.study.revision),
    studyDate: results.study.date,
    title: results.study.title,
    studyFile: results.provenance.studyFile,
    studySourceSha256: results.provenance.studySourceSha256,
    effectiveInputs,
    results: results.results.map((result) => ({
      name: result.name,
      value: result.value,
      ...(result.unit ? { unit: result.unit } : {}),
      ...(result.tolerance !== undefined ? { tolerance: result.tolerance } : {}),
    })),
    criteria: results.criteria.map((criterion) => ({
      name: criterion.name,
      value: criterion.value,
      ...(criterion.unit ? { unit: criterion.unit } : {}),
      passed: criterion.passed,
      limits: formatLimits(criterion),
    })),
    cautions: results.cautions.map((caution) => caution.text),
    ...(results.sensitivity ? { sensitivity: sensitivityFigures(results.sensitivity) } : {}),
    kvarbookVersion: results.provenance.kvarbookVersion,
    nodeVersion: results.provenance.nodeVersion,
    lockfileSha256: results.provenance.lockfileSha256,
    reportBodySha256: bodySha256,
  };
}

/** A seal over overridden inputs is a variant's, and says so with the values it was sealed with (signed in the manifest). */
function variantLine(envelope: SealEnvelope): string {
  const overridden = Object.entries(envelope.manifest.effectiveInputs).filter(([, input]) => input.source === 'overridden');
  if (overridden.length === 0) return '';
  const values = overridden.map(([name, input]) => `${escapeHtml(name)} = ${escapeHtml(formatQuantity(formatStated(input.value, 15), input.unit))}`);
  return `<p class="variant"><strong>This is a variant of the study</strong>: sealed with ${values.join(', ')} in place of the values the study gives.</p>\n`;
}

function sealSection(envelope: SealEnvelope, checks: readonly CheckRecord[]): string {
  const signer = envelope.manifest.signer;
  const checkLines = checks
    .map((check) => {
      const who = check.statement.checker;
      return `<p class="countersign"><strong>Checked</strong> by ${escapeHtml(who.name)}, licence ${escapeHtml(who.licence)} (${escapeHtml(who.jurisdiction)}), on ${escapeHtml(check.statement.checkedOn)}: <strong>${check.statement.verdict === 'verified' ? 'every figure re-computed and verified' : 'check FAILED'}</strong>. Key <span class="fingerprint">${hashHtml(who.fingerprint)}</span>.</p>`;
    })
    .join('\n');
  return `<section class="seal sealed" id="seal">
<p><strong>Sealed</strong> by ${escapeHtml(signer.name)}, licence ${escapeHtml(signer.licence)} (${escapeHtml(signer.jurisdiction)}), for the study dated ${escapeHtml(envelope.manifest.studyDate)}.</p>
${variantLine(envelope)}<p>Signing key <span class="fingerprint">${hashHtml(signer.fingerprint)}</span>. The signature was verified when the report was sealed; it covers ${envelope.manifest.results.length} named results, ${envelope.manifest.criteria.length} criteria, ${envelope.manifest.sensitivity ? `${envelope.manifest.sensitivity.length} sensitivity figures, ` : ''}the cautions, the study source and this report's body. Re-verify with <code>kvarbook check</code>.</p>
${checkLines}
</section>`;
}

/** The seal slot's whole content: what readers see and the signed data a checker reads back. */
function sealSlot(envelope: SealEnvelope, checks: readonly CheckRecord[] = []): string {
  const scripts = [
    jsonScript(SEAL_SCRIPT_OPEN, serializeEnvelope(envelope)),
    ...checks.map((check) => jsonScript(CHECK_SCRIPT_OPEN, serializeCheckRecord(check))),
  ];
  return `${sealSection(envelope, checks)}\n${scripts.join('\n')}\n`;
}

export function sealedReportHtml(parts: ReportParts, envelope: SealEnvelope, checks: readonly CheckRecord[] = []): string {
  return assembleReport(parts, sealSlot(envelope, checks));
}

export interface SealedHtmlContents {
  parts: ReportParts;
  /** Parsed but not yet verified. */
  envelope: unknown;
  checks: unknown[];
}

export type SealedHtmlReading = { ok: true; contents: SealedHtmlContents } | { ok: false; problem: string };

/** Split a sealed report into body parts and embedded seal data; any damage to the framing is a problem. */
export function readSealedHtml(html: string): SealedHtmlReading {
  const start = html.indexOf(SEAL_SLOT_START);
  const end = html.indexOf(SEAL_SLOT_END);
  if (start < 0 || end < start || html.indexOf(SEAL_SLOT_START, start + 1) >= 0 || html.indexOf(SEAL_SLOT_END, end + 1) >= 0) {
    return { ok: false, problem: 'the report has no intact seal slot (its markers are missing, repeated or out of order)' };
  }
  const slot = html.slice(start + SEAL_SLOT_START.length, end);
  const sealTexts = jsonScriptTexts(slot, SEAL_SCRIPT_OPEN);
  if (sealTexts.length !== 1)
    return { ok: false, problem: sealTexts.length === 0 ? 'the report is not sealed (no seal data in it)' : 'the report holds more than one seal' };
  const parse = (text: string): unknown => JSON.parse(text);
  try {
    return {
      ok: true,
      contents: {
        parts: { head: html.slice(0, start), body: html.slice(end + SEAL_SLOT_END.length) },
        envelope: parse(sealTexts[0]!),
        checks: jsonScriptTexts(slot, CHECK_SCRIPT_OPEN).map(parse),
      },
    };
  } catch (error) {
    return { ok: false, problem: `the embedded seal data is not readable JSON (${(error as Error).message})` };
  }
}
