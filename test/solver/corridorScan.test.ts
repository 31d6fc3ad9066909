import { describe, expect, test } from 'vitest';
import { corridorFrequencyScan, frequencyScan, type CorridorInput, type ScanElement } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const generator = { subtransientReactanceOhm: 28 };
const transformer = { reactanceOhm: 22 };

function corridorOf(options: { circuits: 1 | 2; reactanceOhm: number; susceptanceUsPerKm?: number; perKmScale?: number }): CorridorInput {
  const scale = options.perKmScale ?? 1;
  return {
    frequencyHz: 50,
    nominalVoltageKv: 400,
    sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 410 },
    receivingSystem: { shortCircuitMva: 8000, xOverR: 10, emfKv: 400 },
    buses: [{ name: 'Penhallow' }, { name: 'Ruddock Bay', reactors: [{ name: 'RR', qMvar: 60, ratedVoltageKv: 420, inService: false }] }],
    sections: [
      {
        from: 'Penhallow',
        to: 'Ruddock Bay',
        lengthKm: 350,
        circuits: options.circuits,
        seriesResistanceOhmPerKm: perKm.seriesResistanceOhmPerKm * scale,
        seriesReactanceOhmPerKm: perKm.seriesReactanceOhmPerKm * scale,
        shuntSusceptanceUsPerKm: (options.susceptanceUsPerKm ?? perKm.shuntSusceptanceUsPerKm) / scale,
        seriesCapacitors: [{ name: 'SC-P', position: 'sending-end', reactanceOhm: options.reactanceOhm, ratedCurrentA: 2000 }],
      },
    ],
  };
}
const peak = { label: 'peak', loading: { kind: 'transfer' as const, pMw: 600 } };

describe('the frequency scan of a corridor case', () => {
  test('scans the same chain as one built by hand from the corridor data (generator, transformer, bank, line, receiving system)', () => {
    const corridor = corridorOf({ circuits: 1, reactanceOhm: 60 });
    const scan = corridorFrequencyScan({ corridor, case: peak, generator, transformer });
    // Receiving system: |Z| = V^2 / S_sc at atan(X/R).
    const systemOhm = 400 ** 2 / 8000;
    const angle = Math.atan(10);
    const byHand: ScanElement[] = [
      { kind: 'generator', subtransientReactanceOhm: 28 },
      { kind: 'transformer', reactanceOhm: 22 },
      { kind: 'series-capacitor', reactanceOhm: 60 },
      { kind: 'line-section', lengthKm: 350, ...perKm },
      { kind: 'system', reactanceOhm: systemOhm * Math.sin(angle), resistanceOhm: systemOhm * Math.cos(angle) },
    ];
    const reference = frequencyScan({ frequencyHz: 50, elements: byHand });
    expect(scan.seriesResonances.map((resonance) => resonance.frequencyHz)).toHaveLength(reference.seriesResonances.length);
    scan.seriesResonances.forEach((resonance, index) => expect(resonance.frequencyHz).toBeCloseTo(reference.seriesResonances[index]!.frequencyHz, 9));
    scan.points.reactanceOhm.forEach((reactance, index) => expect(reactance).toBeCloseTo(reference.points.reactanceOhm[index]!, 6));
  });

  test('treats two identical circuits in service as one with half the series impedance and twice the charging (parallel circuits)', () => {
    const double = corridorFrequencyScan({ corridor: corridorOf({ circuits: 2, reactanceOhm: 60 }), case: peak, generator, transformer });
    const single = corridorFrequencyScan({
      corridor: corridorOf({ circuits: 1, reactanceOhm: 30, perKmScale: 0.5 }),
      case: peak,
      generator,
      transformer,
    });
    double.points.reactanceOhm.forEach((reactance, index) => expect(reactance).toBeCloseTo(single.points.reactanceOhm[index]!, 6));
  });

  test('finds the series resonance of a short, nearly lumped chain at f0 sqrt(Xc / X), the LC resonance of the loop', () => {
    const reactanceOhm = 70;
    const scan = corridorFrequencyScan({
      corridor: corridorOf({ circuits: 1, reactanceOhm, susceptanceUsPerKm: 1e-3 }),
      case: peak,
      generator,
      transformer,
      stepHz: 0.01,
    });
    const systemX = (400 ** 2 / 8000) * Math.sin(Math.atan(10));
    const loopX = 28 + 22 + perKm.seriesReactanceOhmPerKm * 350 + systemX;
    expect(scan.seriesResonances).toHaveLength(1);
    expect(scan.seriesResonances[0]!.frequencyHz).toBeCloseTo(50 * Math.sqrt(reactanceOhm / loopX), 2);
  });

  test('has no subsynchronous series resonance when the bank is bypassed', () => {
    const scan = corridorFrequencyScan({
      corridor: corridorOf({ circuits: 1, reactanceOhm: 60 }),
      case: { ...peak, bypassed: ['SC-P'] },
      generator,
      transformer,
    });
    expect(scan.elements.some((element) => element.kind === 'series-capacitor')).toBe(false);
    expect(scan.seriesResonances).toEqual([]);
  });

  test('puts a shunt reactor in service in the chain, and says that the sending system is replaced by the generator', () => {
    const scan = corridorFrequencyScan({
      corridor: corridorOf({ circuits: 1, reactanceOhm: 60 }),
      case: { ...peak, unitsIn: ['RR'] },
      generator,
      transformer,
    });
    expect(scan.elements).toContainEqual({ kind: 'shunt-reactor', qMvar: 60, ratedVoltageKv: 420 });
    expect(scan.omissions[0]).toMatch(/sending system .* replaced by the generator/);
  });
});
