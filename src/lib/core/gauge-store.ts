/**
 * Gauges and their measurement-system studies (worker-safe: no Astro; the caller passes its
 * Sequelize instance). A study's readings, its computed result and its audit row commit
 * together; so does the link of a characteristic to the gauge that measures it.
 */
import { QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import { CharacteristicGauge, Gauge, GaugeStudy } from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import { evaluateGaugeStudy, type GaugeStudyData, type GaugeStudyOutcome } from '../domain/msa/study.ts';
import type { GaugeCreate, GaugeStudyCreate } from '../shared/msa.ts';
import { DomainError, fieldError } from './errors.ts';

export interface GaugeView {
  id: number;
  name: string;
  kind: string;
  unit: string;
  resolution: number | null;
  note: string | null;
  /** The verdict of the newest gauge R&R study, or null when there is none. */
  grrStatus: 'acceptable' | 'conditional' | 'unacceptable' | null;
  lastGrrStudyId: number | null;
  studies: number;
}

export interface GaugeStudyView {
  id: number;
  gaugeId: number;
  gaugeName: string;
  unit: string;
  kind: 'grr' | 'bias' | 'linearity';
  method: string;
  title: string;
  tolerance: number | null;
  verdict: 'acceptable' | 'conditional' | 'unacceptable';
  studiedAt: string;
  data: GaugeStudyData;
  result: GaugeStudyOutcome;
}

/** The study input without its record fields, as the domain takes it. */
export function studyData(input: GaugeStudyCreate): GaugeStudyData {
  if (input.kind === 'grr') return { kind: 'grr', method: input.method, tolerance: input.tolerance, readings: input.readings };
  if (input.kind === 'bias')
    return { kind: 'bias', reference: input.reference, readings: input.readings, processVariation: input.processVariation };
  return { kind: 'linearity', points: input.points, processVariation: input.processVariation };
}

/** Compute a study; a study the methods cannot judge (unbalanced, no variation) is a 422 on `readings`. */
export function computeStudy(data: GaugeStudyData): GaugeStudyOutcome {
  try {
    return evaluateGaugeStudy(data);
  } catch (e) {
    if (e instanceof RangeError)
      throw fieldError(data.kind === 'linearity' ? 'points' : 'readings', e.message, 'unprocessable', 'Study cannot be judged');
    throw e;
  }
}

export async function createGauge(sequelize: Sequelize, actor: AuditActor, input: GaugeCreate): Promise<GaugeView> {
  try {
    return await withTransaction(sequelize, async (t) => {
      const g = await Gauge.create(
        { name: input.name, kind: input.kind, unit: input.unit, resolution: input.resolution ?? null, note: input.note ?? null },
        { transaction: t },
      );
      await auditIn(t, actor, { action: 'gauge.create', entity: 'gauge', entityId: g.id, after: input });
      return { ...viewOf(g), grrStatus: null, lastGrrStudyId: null, studies: 0 };
    });
  } catch (e) {
    if (e instanceof UniqueConstraintError)
      throw fieldError('name', 'a gauge of that name exists', 'conflict', 'Duplicate gauge');
    throw e;
  }
}

function viewOf(g: Gauge) {
  return { id: g.id, name: g.name, kind: g.kind, unit: g.unit, resolution: g.resolution, note: g.note };
}

/** Every gauge with the verdict of its newest gauge R&R study. */
export async function listGauges(sequelize: Sequelize): Promise<GaugeView[]> {
  void sequelize;
  const gauges = await Gauge.findAll({ order: [['name', 'ASC']] });
  const studies = await GaugeStudy.findAll({
    attributes: ['id', 'gaugeId', 'kind', 'verdict', 'studiedAt'],
    order: [
      ['studiedAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  return gauges.map((g) => {
    const mine = studies.filter((s) => s.gaugeId === g.id);
    const grr = mine.find((s) => s.kind === 'grr') ?? null;
    return { ...viewOf(g), grrStatus: grr?.verdict ?? null, lastGrrStudyId: grr?.id ?? null, studies: mine.length };
  });
}

/** Compute and store a study, with its audit row. */
export async function recordGaugeStudy(
  sequelize: Sequelize,
  actor: AuditActor,
  input: GaugeStudyCreate,
  now: Date,
): Promise<GaugeStudyView> {
  const data = studyData(input);
  const result = computeStudy(data);
  return withTransaction(sequelize, async (t) => {
    const gauge = await Gauge.findByPk(input.gaugeId, { transaction: t });
    if (!gauge) throw fieldError('gaugeId', 'no such gauge', 'not-found', 'Not found');
    const row = await GaugeStudy.create(
      {
        gaugeId: gauge.id,
        kind: input.kind,
        method: input.kind === 'grr' ? input.method : input.kind,
        title: input.title,
        tolerance: input.kind === 'grr' ? (input.tolerance ?? null) : null,
        data,
        result,
        verdict: result.verdict,
        studiedAt: input.studiedAt ? new Date(input.studiedAt) : now,
        recordedBy: actor.id,
      },
      { transaction: t },
    );
    await auditIn(t, actor, {
      action: 'gauge.study',
      entity: 'gauge_study',
      entityId: row.id,
      after: { gaugeId: gauge.id, kind: row.kind, method: row.method, title: row.title, verdict: row.verdict },
    });
    return toStudyView(row, gauge);
  });
}

function toStudyView(s: GaugeStudy, g: Gauge): GaugeStudyView {
  return {
    id: s.id,
    gaugeId: g.id,
    gaugeName: g.name,
    unit: g.unit,
    kind: s.kind,
    method: s.method,
    title: s.title,
    tolerance: s.tolerance,
    verdict: s.verdict,
    studiedAt: s.studiedAt.toISOString(),
    data: s.data as GaugeStudyData,
    result: s.result as GaugeStudyOutcome,
  };
}

export async function getGaugeStudy(sequelize: Sequelize, id: number): Promise<GaugeStudyView> {
  void sequelize;
  const s = await GaugeStudy.findByPk(id, { include: [{ model: Gauge }] });
  const g = (s as (GaugeStudy & { Gauge?: Gauge }) | null)?.Gauge;
  if (!s || !g) throw new DomainError('not-found', 'Not found', 'No such gauge study.');
  return toStudyView(s, g);
}

/** Studies of one gauge (or all), newest first, without their readings. */
export async function listGaugeStudies(
  sequelize: Sequelize,
  gaugeId?: number,
): Promise<Omit<GaugeStudyView, 'data' | 'result'>[]> {
  void sequelize;
  const rows = await GaugeStudy.findAll({
    ...(gaugeId ? { where: { gaugeId } } : {}),
    include: [{ model: Gauge }],
    order: [
      ['studiedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 500,
  });
  return rows.map((s) => {
    const { data: _d, result: _r, ...rest } = toStudyView(s, (s as GaugeStudy & { Gauge: Gauge }).Gauge);
    return rest;
  });
}

/** Link a characteristic to the gauge that measures it (null unlinks); audited. */
export async function setCharacteristicGauge(
  sequelize: Sequelize,
  actor: AuditActor,
  characteristicId: number,
  gaugeId: number | null,
): Promise<{ characteristicId: number; gaugeId: number | null }> {
  return withTransaction(sequelize, async (t) => {
    const [found] = await sequelize.query<{ id: number }>('select id from characteristics where id = $1', {
      bind: [characteristicId],
      transaction: t,
      type: QueryTypes.SELECT,
    });
    if (!found) throw new DomainError('not-found', 'Not found', 'No such characteristic.');
    if (gaugeId !== null && !(await Gauge.findByPk(gaugeId, { transaction: t })))
      throw fieldError('gaugeId', 'no such gauge', 'invalid');
    const before = await CharacteristicGauge.findByPk(characteristicId, { transaction: t });
    if (gaugeId === null) await CharacteristicGauge.destroy({ where: { characteristicId }, transaction: t });
    else await CharacteristicGauge.upsert({ characteristicId, gaugeId }, { transaction: t });
    await auditIn(t, actor, {
      action: 'characteristic.gauge',
      entity: 'characteristic',
      entityId: characteristicId,
      before: { gaugeId: before?.gaugeId ?? null },
      after: { gaugeId },
    });
    return { characteristicId, gaugeId };
  });
}

export interface CharacteristicGaugeStatus {
  gauge: GaugeView | null;
  /** A warning for the capability report, or null when the gauge has an acceptable R&R study. */
  warning: string | null;
}

/** The gauge of a characteristic and whether its newest gauge R&R study is acceptable. */
export async function characteristicGaugeStatus(
  sequelize: Sequelize,
  characteristicId: number,
): Promise<CharacteristicGaugeStatus> {
  const link = await CharacteristicGauge.findByPk(characteristicId);
  if (!link) return { gauge: null, warning: null };
  const gauge = (await listGauges(sequelize)).find((g) => g.id === link.gaugeId) ?? null;
  if (!gauge) return { gauge: null, warning: null };
  const warning =
    gauge.grrStatus === 'acceptable'
      ? null
      : gauge.grrStatus === null
        ? `The gauge “${gauge.name}” has no gauge R&R study: the spread in this report may be the gauge’s, not the process’s.`
        : gauge.grrStatus === 'conditional'
          ? `The newest gauge R&R study of “${gauge.name}” is only conditionally acceptable (%GRR 10–30 %): read the indices with that in mind.`
          : `The newest gauge R&R study of “${gauge.name}” is unacceptable: the capability indices mostly measure the gauge.`;
  return { gauge, warning };
}

/** Every characteristic → gauge link (one query). */
export async function listCharacteristicGauges(sequelize: Sequelize): Promise<Map<number, number>> {
  void sequelize;
  const rows = await CharacteristicGauge.findAll({ attributes: ['characteristicId', 'gaugeId'] });
  return new Map(rows.map((r) => [r.characteristicId, r.gaugeId]));
}
