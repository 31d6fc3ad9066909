// Turning a seal module's error into the command line's one kind of problem report.
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { SealError } from '../seal/errors.ts';

export async function withSealErrors<T>(work: () => Promise<T> | T): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (error instanceof SealError) throw new StudyFailure([{ code: `seal-${error.code}`, message: error.message, hint: error.hint }]);
    throw error;
  }
}
