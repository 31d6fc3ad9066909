// Where a report came from: kvarbook and Node versions, hashes of the lock file and study, the limits it ran under.
import type { RunLimits } from '../study/model.ts';
import { HOST_STAGE_LIMITS, OUTPUT_LIMITS } from '../execute/limits.ts';
import { formatCount } from '../blocks/format.ts';

export interface Provenance {
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
  studyFile: string;
  studySourceSha256: string;
  /** The limits the run held the study to. */
  limits: RunLimits;
  /** What the study asked for where the run's ceilings capped it; absent when nothing was capped. */
  limitsAsked?: Partial<RunLimits>;
  typeChecked: boolean;
  isolation: string;
}

const megabytes = (bytes: number) => `${bytes / 1024 / 1024} MB`;

/** Every bound the run was held to, in one sentence for the report's provenance. */
export function describeLimits(provenance: Provenance): string {
  const { limits, limitsAsked } = provenance;
  const { chart, typecheck } = HOST_STAGE_LIMITS;
  const asked = limitsAsked
    ? [
        limitsAsked.blockSeconds !== undefined ? `${limitsAsked.blockSeconds} s per block` : '',
        limitsAsked.studySeconds !== undefined ? `${limitsAsked.studySeconds} s per study` : '',
        limitsAsked.heapMb !== undefined ? `${limitsAsked.heapMb} MB heap` : '',
      ].filter((text) => text !== '')
    : [];
  return [
    `${limits.blockSeconds} s per block, ${limits.studySeconds} s per study, ${limits.heapMb} MB heap${asked.length > 0 ? ` (capped by the ceilings of the run: the study asks ${asked.join(', ')})` : ''}`,
    `output at most ${formatCount(OUTPUT_LIMITS.textCharacters)} characters per text (${formatCount(OUTPUT_LIMITS.nameCharacters)} per name), ${formatCount(OUTPUT_LIMITS.tableCells)} cells per table, ${megabytes(OUTPUT_LIMITS.studyOutputBytes)} of output in all`,
    `report at most ${megabytes(OUTPUT_LIMITS.reportBytes)}`,
    `each chart drawn within ${chart.callSeconds} s and ${chart.heapMb} MB, the type check within ${typecheck.callSeconds} s and ${typecheck.heapMb} MB`,
  ].join('; ');
}
