// Where a report came from: kvarbook and Node versions, hashes of the lock file and study, the limits it ran under.
import type { RunLimits } from '../study/model.ts';

export interface Provenance {
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
  studyFile: string;
  studySourceSha256: string;
  limits: RunLimits;
  typeChecked: boolean;
  isolation: string;
}
