import { describe, expect, test } from 'vitest';
import { SolverDomainError, solveCorridorCase, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const corridor = (): CorridorInput => ({
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 410 },
  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
  buses: [
    { name: 'Ashgrove' },
    { name: 'Brindle', reactors: [{ name: 'R1', qMvar: 60, ratedVoltageKv: 400 }] },
    { name: 'Corrie', capacitors: [{ name: 'C1', qMvar: 50, ratedVoltageKv: 400 }], reactors: [{ name: 'R2', qMvar: 80, ratedVoltageKv: 400 }] },
  ],
  sections: [
    { from: 'Ashgrove', to: 'Brindle', lengthKm: 150, ...perKm },
    {
      from: 'Brindle',
      to: 'Corrie',
      lengthKm: 180,
      ...perKm,
      seriesCapacitors: [{ name: 'SC', position: 'mid-section', reactanceOhm: 20, ratedCurrentA: 2000 }],
    },
  ],
});

const load = { label: 'peak', loading: { kind: 'receiving-load' as const, pMw: 400, qMvar: 100 } };

function errorOf(run: () => unknown): SolverDomainError {
  try {
    run();
  } catch (error) {
    if (error instanceof SolverDomainError) return error;
    throw error;
  }
  throw new Error('expected a SolverDomainError');
}

describe('corridor data validation', () => {
  test('names the path of a negative reactor rating', () => {
    const data = corridor();
    data.buses[2]!.reactors![0]!.qMvar = -80;
    const error = errorOf(() => solveCorridorCase({ corridor: data, case: load }));
    expect(error.code).toBe('out-of-range');
    expect(error.quantity).toBe('corridor.buses[2].reactors[0].qMvar');
  });

  test('refuses a section that names an unknown bus', () => {
    const data = corridor();
    data.sections[1]!.to = 'Dunmore';
    const error = errorOf(() => solveCorridorCase({ corridor: data, case: load }));
    expect(error.quantity).toBe('corridor.sections[1].to');
    expect(error.allowedRange).toMatch(/no bus has this name/);
  });

  test('refuses a section that skips a bus', () => {
    const data = corridor();
    data.sections[1]!.from = 'Ashgrove';
    expect(errorOf(() => solveCorridorCase({ corridor: data, case: load })).code).toBe('inconsistent-quantities');
  });

  test('refuses fewer sections than pairs of buses (a bank on a missing section)', () => {
    const data = corridor();
    data.sections.pop();
    expect(errorOf(() => solveCorridorCase({ corridor: data, case: load })).quantity).toBe('corridor.sections.length');
  });

  test('puts the section path in front of a bad per-km constant', () => {
    const data = corridor();
    data.sections[0]!.seriesResistanceOhmPerKm = -0.1;
    expect(errorOf(() => solveCorridorCase({ corridor: data, case: load })).quantity).toBe('corridor.sections[0].seriesResistanceOhmPerKm');
  });

  test('refuses two units with one name, naming both places', () => {
    const data = corridor();
    data.buses[2]!.capacitors![0]!.name = 'R1';
    const error = errorOf(() => solveCorridorCase({ corridor: data, case: load }));
    expect(error.quantity).toBe('corridor.buses[2].capacitors[0].name');
    expect(error.allowedRange).toMatch(/corridor\.buses\[1\]\.reactors\[0\]/);
  });

  test('refuses a system with both an EMF and a held voltage', () => {
    const data = corridor();
    data.sendingSystem.heldVoltageKv = 400;
    expect(errorOf(() => solveCorridorCase({ corridor: data, case: load })).code).toBe('inconsistent-quantities');
  });

  test('refuses a series segment in an unknown position', () => {
    const data = corridor();
    (data.sections[1]!.seriesCapacitors![0] as { position: string }).position = 'quarter';
    expect(errorOf(() => solveCorridorCase({ corridor: data, case: load })).quantity).toBe('corridor.sections[1].seriesCapacitors[0].position');
  });
});

describe('case data validation', () => {
  test('refuses a case that switches out a unit the corridor does not have', () => {
    const error = errorOf(() => solveCorridorCase({ corridor: corridor(), case: { ...load, unitsOut: ['R9'] } }));
    expect(error.quantity).toBe('case.unitsOut[0]');
    expect(error.allowedRange).toMatch(/'R1'/);
  });

  test('refuses to bypass a unit that is not a series segment', () => {
    expect(errorOf(() => solveCorridorCase({ corridor: corridor(), case: { ...load, bypassed: ['R1'] } })).quantity).toBe('case.bypassed[0]');
  });

  test('refuses a voltage control at an unknown bus', () => {
    const error = errorOf(() =>
      solveCorridorCase({
        corridor: corridor(),
        case: { label: 'x', loading: { kind: 'transfer', pMw: 300 }, voltageControl: [{ bus: 'Elsewhere', voltageKv: 400 }] },
      }),
    );
    expect(error.quantity).toBe('case.voltageControl[0].bus');
  });

  test('refuses a transfer with the receiving system open', () => {
    const error = errorOf(() =>
      solveCorridorCase({ corridor: corridor(), case: { label: 'x', loading: { kind: 'transfer', pMw: 300 }, receivingSystem: { open: true } } }),
    );
    expect(error.quantity).toBe('case.receivingSystem.open');
  });

  test('switches a unit out by name: the reactor then carries no current', () => {
    const result = solveCorridorCase({ corridor: corridor(), case: { ...load, unitsOut: ['R2'] } });
    if (!result.solved) throw new Error(result.reason);
    expect(result.shuntUnits.find((unit) => unit.name === 'R2')).toMatchObject({ inService: false, outputMvar: 0, currentA: 0 });
    const reactor = result.shuntUnits.find((unit) => unit.name === 'R1')!;
    const voltageKv = result.buses[1]!.voltageKv;
    expect(reactor.outputMvar).toBeCloseTo(-60 * (voltageKv / 400) ** 2, 9);
    expect(reactor.currentA).toBeCloseTo((60e6 * (voltageKv / 400) ** 2) / (Math.sqrt(3) * voltageKv * 1e3), 6);
  });
});

describe('case data validation: conflicting voltage controls', () => {
  test('refuses a voltage control at a bus a system already holds', () => {
    const data = corridor();
    data.sendingSystem = { shortCircuitMva: 15000, xOverR: 15, heldVoltageKv: 405 };
    const error = errorOf(() =>
      solveCorridorCase({
        corridor: data,
        case: { label: 'x', loading: { kind: 'transfer', pMw: 300 }, voltageControl: [{ bus: 'Ashgrove', voltageKv: 400 }] },
      }),
    );
    expect(error.code).toBe('inconsistent-quantities');
    expect(error.quantity).toBe('case.voltageControl[0].bus');
  });

  test('refuses two voltage controls at one bus', () => {
    const error = errorOf(() =>
      solveCorridorCase({
        corridor: corridor(),
        case: {
          label: 'x',
          loading: { kind: 'transfer', pMw: 300 },
          voltageControl: [
            { bus: 'Brindle', voltageKv: 400 },
            { bus: 'Brindle', voltageKv: 405 },
          ],
        },
      }),
    );
    expect(error.quantity).toBe('case.voltageControl[1].bus');
  });
});
