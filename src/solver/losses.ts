// Losses per element and in total for an operating point: active losses and reactive consumption element by element along the route.
import { assertFiniteResult, requireObject } from './errors.ts';
import { readOperatingPointEnds, requireSameNetwork } from './profile.ts';
import { readNetwork, type OperatingPoint } from './solutions.ts';
import { abcdOf, elementsOf, labelOf, throughTwoPort, type TwoPort } from './twoPort.ts';
import { lineKvFromPhaseVolts, varToMvar, wToMw } from './units.ts';

export interface ElementLoss {
  label: string;
  kind: string;
  /** Active power lost in the element (P in - P out). */
  lossesMw: number;
  /** Reactive power consumed by the element (Q in - Q out); negative when it generates (capacitors, line charging). */
  reactiveMvar: number;
  inputVoltageKv: number;
  outputVoltageKv: number;
  inputCurrentA: number;
  outputCurrentA: number;
}

export interface ElementLosses {
  networkLabel: string;
  elements: ElementLoss[];
  total: { lossesMw: number; reactiveMvar: number };
}

const HINT = 'Pass { network, operatingPoint } with operatingPoint from a solve... function on the same network.';

/** Active losses and reactive consumption of each element of the network at an operating point, and their totals. */
export function elementLosses(options: { network: TwoPort; operatingPoint: OperatingPoint }): ElementLosses {
  const record = requireObject('options', options, HINT);
  const { network } = readNetwork(record);
  const ends = readOperatingPointEnds(record.operatingPoint, HINT);
  let { voltage, current } = ends.sending;
  const elements = elementsOf(network).map((element) => {
    const { voltage: outVoltage, current: outCurrent } = throughTwoPort(abcdOf(element), voltage, current);
    const powerIn = voltage.mul(current.conjugate()).mul(3);
    const powerOut = outVoltage.mul(outCurrent.conjugate()).mul(3);
    const loss = {
      label: labelOf(element),
      kind: element.kind,
      lossesMw: wToMw(powerIn.re - powerOut.re),
      reactiveMvar: varToMvar(powerIn.im - powerOut.im),
      inputVoltageKv: lineKvFromPhaseVolts(voltage.abs()),
      outputVoltageKv: lineKvFromPhaseVolts(outVoltage.abs()),
      inputCurrentA: current.abs(),
      outputCurrentA: outCurrent.abs(),
    };
    voltage = outVoltage;
    current = outCurrent;
    return loss;
  });
  requireSameNetwork(voltage, current, ends.receiving.voltage, ends.receiving.current, ends.sending.current, labelOf(network));
  return assertFiniteResult('elementLosses', {
    networkLabel: labelOf(network),
    elements,
    total: {
      lossesMw: elements.reduce((sum, element) => sum + element.lossesMw, 0),
      reactiveMvar: elements.reduce((sum, element) => sum + element.reactiveMvar, 0),
    },
  });
}
