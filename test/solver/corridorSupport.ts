// Shared pieces of the corridor tests: the invented per-km constants and the unwrapping of a solved case.
import type { CorridorCaseSolution, SolvedCorridorCase } from '../../src/solver/index.ts';

/** An invented 400 kV quad-bundle line (per circuit, positive sequence). */
export const perKm = { seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };

/** The solved case, or a test failure quoting the reason it was not solved. */
export function solved(result: CorridorCaseSolution): SolvedCorridorCase {
  if (!result.solved) throw new Error(`case unsolved: ${result.reason}`);
  return result;
}
