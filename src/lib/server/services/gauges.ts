/**
 * Gauges and measurement-system studies for the web app: a thin layer over
 * lib/core/gauge-store.ts (which owns the transactions and audit rows) and the MSA calculators.
 */
import {
  characteristicGaugeStatus,
  computeStudy,
  createGauge,
  getGaugeStudy,
  listCharacteristicGauges,
  listGaugeStudies,
  listGauges,
  recordGaugeStudy,
  setCharacteristicGauge,
} from '../../core/gauge-store.ts';
import type { GaugeBiasInput, GaugeCreate, GaugeLinearityInput, GaugeRrInput, GaugeStudyCreate } from '../../shared/msa.ts';
import type { SessionUser } from '../auth.ts';
import { db } from '../db.ts';
import { actorOf } from '../guard.ts';

export const gauges = {
  list: () => listGauges(db()),
  create: (user: SessionUser, input: GaugeCreate, address: string | null) => createGauge(db(), actorOf(user, address), input),
  studies: (gaugeId?: number) => listGaugeStudies(db(), gaugeId),
  study: (id: number) => getGaugeStudy(db(), id),
  record: (user: SessionUser, input: GaugeStudyCreate, address: string | null) =>
    recordGaugeStudy(db(), actorOf(user, address), input, new Date()),
  linkCharacteristic: (user: SessionUser, characteristicId: number, gaugeId: number | null, address: string | null) =>
    setCharacteristicGauge(db(), actorOf(user, address), characteristicId, gaugeId),
  characteristicStatus: (characteristicId: number) => characteristicGaugeStatus(db(), characteristicId),
  links: () => listCharacteristicGauges(db()),
};

/** The MSA calculators: the same computation as a stored study, nothing stored. */
export const msaCalc = {
  grr: (input: GaugeRrInput) =>
    computeStudy({ kind: 'grr', method: input.method, tolerance: input.tolerance, readings: input.readings }),
  bias: (input: GaugeBiasInput) =>
    computeStudy({
      kind: 'bias',
      reference: input.reference,
      readings: input.readings,
      processVariation: input.processVariation,
    }),
  linearity: (input: GaugeLinearityInput) =>
    computeStudy({ kind: 'linearity', points: input.points, processVariation: input.processVariation }),
};
