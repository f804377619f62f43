import { Op } from 'sequelize';
import { resolveLimits, type ResolvedLimits } from '../../../procedures/engine';
import type { Step } from '../../../procedures/schema';
import { DRIFT_RULE, type MachineTrends, type TrendDrift, type TrendLimits, type TrendPoint, type TrendSeries } from '../../contracts/trends';
import { AppError } from '../../lib/errors';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord, StepEntry } from '../records/model';
import { Machine } from './model';

/**
 * Figures charted although their procedure sets no limits for them, because a supervisor still
 * watches them over time (procedureKey/stepId/valueId). Every figure that has limits is charted.
 */
export const ALSO_CHARTED: readonly string[] = ['speed-change/choose-speed/step-speed'];

interface Charted {
  key: string;
  procedure: ProcedureVersion;
  step: Step;
  valueId: string;
  label: string;
  unit: string | null;
  decimals: number;
  kind: 'input' | 'computed';
  limits: ResolvedLimits | undefined;
}

/** The readings a procedure version charts: number inputs and numeric computed figures with limits, and ALSO_CHARTED. */
function chartedIn(version: ProcedureVersion, spec: Record<string, unknown>): Charted[] {
  const out: Charted[] = [];
  for (const step of version.body.steps) {
    const keyOf = (valueId: string) => `${version.key}/${step.id}/${valueId}`;
    for (const input of step.inputs) {
      if (input.type !== 'number' || (!input.limits && !ALSO_CHARTED.includes(keyOf(input.id)))) continue;
      out.push({ key: keyOf(input.id), procedure: version, step, valueId: input.id, label: input.label, unit: input.unit, decimals: input.decimals, kind: 'input', limits: safeLimits(() => resolveLimits(input.limits, spec, input.unit)) });
    }
    for (const field of step.computed) {
      if (!field.limits && !ALSO_CHARTED.includes(keyOf(field.id))) continue;
      if (field.acceptable) continue; // a text verdict, not a figure
      out.push({ key: keyOf(field.id), procedure: version, step, valueId: field.id, label: field.label, unit: field.unit ?? null, decimals: field.decimals, kind: 'computed', limits: safeLimits(() => resolveLimits(field.limits, spec, field.unit)) });
    }
  }
  return out;
}

/** Limits that name a figure the machine's specification lacks are shown as none, not as an error. */
function safeLimits(resolve: () => ResolvedLimits | undefined): ResolvedLimits | undefined {
  try {
    return resolve();
  } catch {
    return undefined;
  }
}

/** The stored reading of one charted figure in one entry, as the server judged it when it was saved. */
function pointFrom(c: Charted, entry: StepEntry, record: SetupRecord): TrendPoint | null {
  if (c.kind === 'input') {
    const value = entry.values[c.valueId];
    if (typeof value !== 'number' || !Number.isFinite(value)) return null;
    const judged = entry.evaluation.inputs.find((i) => i.id === c.valueId);
    return { recordId: record.id, at: entry.createdAt.toISOString(), value, unit: judged?.limits?.unit ?? c.unit, outOfLimits: judged?.outcome === 'fail', recordStatus: record.status };
  }
  const computed = entry.evaluation.computed.find((x) => x.id === c.valueId);
  if (!computed || typeof computed.value !== 'number' || !Number.isFinite(computed.value)) return null;
  return { recordId: record.id, at: entry.createdAt.toISOString(), value: computed.value, unit: computed.unit ?? c.unit, outOfLimits: computed.outcome === 'fail', recordStatus: record.status };
}

/**
 * The drift rule (DRIFT_RULE): a least-squares line through the last N readings, x = 0 … N−1 for the
 * checks in order, carried on for K more checks; a drift when it passes a limit that the latest
 * reading is still within. Null with fewer than N readings.
 */
export function driftOf(values: readonly number[], limits: TrendLimits | null, rule: { readings: number; ahead: number } = DRIFT_RULE): TrendDrift | null {
  if (!limits || values.length < rule.readings) return null;
  const ys = values.slice(-rule.readings);
  const n = ys.length;
  const meanX = (n - 1) / 2;
  const meanY = ys.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  ys.forEach((y, x) => {
    sxy += (x - meanX) * (y - meanY);
    sxx += (x - meanX) ** 2;
  });
  const slope = sxy / sxx;
  const line = (x: number) => meanY + slope * (x - meanX);
  const latest = ys[n - 1]!;
  const tolerance = 1e-9 * Math.max(1, Math.abs(latest));
  const towardMax = limits.max !== null && slope > 0 && latest <= limits.max + tolerance;
  const towardMin = limits.min !== null && slope < 0 && latest >= limits.min - tolerance;
  for (let k = 1; k <= rule.ahead; k++) {
    const y = line(n - 1 + k);
    if (towardMax && y > limits.max! + tolerance) return { toward: 'max', limit: limits.max!, slopePerCheck: slope, projected: line(n - 1 + rule.ahead), checksToLimit: k };
    if (towardMin && y < limits.min! - tolerance) return { toward: 'min', limit: limits.min!, slopePerCheck: slope, projected: line(n - 1 + rule.ahead), checksToLimit: k };
  }
  return null;
}

const toLimits = (l: ResolvedLimits | undefined, unit: string | null): TrendLimits | null =>
  l && (l.min !== undefined || l.max !== undefined) ? { min: l.min ?? null, max: l.max ?? null, unit: l.unit ?? unit } : null;

/**
 * Readings over time on one machine, from what the server stored and judged: for each charted figure
 * of the procedures approved now, the latest attempt of its step in every record that was not voided.
 */
export async function machineTrends(machineId: string): Promise<MachineTrends> {
  const machine = await Machine.findByPk(machineId);
  if (!machine) throw AppError.notFound('There is no machine with that id.');
  const [approved, records] = await Promise.all([
    ProcedureVersion.findAll({ where: { status: 'approved', machineKind: machine.kind }, order: [['key', 'ASC']] }),
    SetupRecord.findAll({
      where: { machineId, status: { [Op.ne]: 'voided' } },
      include: [{ model: ProcedureVersion, as: 'procedureVersion', attributes: ['id', 'key'] }],
      attributes: ['id', 'status', 'procedureVersionId'],
    }),
  ]);
  const charted = approved.flatMap((v) => chartedIn(v, machine.spec));
  const stepIds = [...new Set(charted.map((c) => c.step.id))];
  const entries = records.length
    ? await StepEntry.findAll({
        where: { recordId: { [Op.in]: records.map((r) => r.id) }, stepId: { [Op.in]: stepIds } },
        attributes: ['recordId', 'stepId', 'attempt', 'values', 'evaluation', 'createdAt'],
        order: [['createdAt', 'ASC']],
      })
    : [];
  // The latest attempt of each step in each record is that record's reading.
  const latest = new Map<string, StepEntry>();
  for (const e of entries) {
    const k = `${e.recordId}/${e.stepId}`;
    const seen = latest.get(k);
    if (!seen || seen.attempt < e.attempt) latest.set(k, e);
  }
  const byId = new Map(records.map((r) => [r.id, r]));
  const series: TrendSeries[] = [];
  for (const c of charted) {
    const points: TrendPoint[] = [];
    for (const e of latest.values()) {
      const record = byId.get(e.recordId)!;
      if (e.stepId !== c.step.id || record.procedureVersion!.key !== c.procedure.key) continue;
      const point = pointFrom(c, e, record);
      if (point) points.push(point);
    }
    if (!points.length) continue;
    points.sort((a, b) => a.at.localeCompare(b.at) || a.recordId.localeCompare(b.recordId));
    const limits = toLimits(c.limits, c.unit);
    series.push({
      key: c.key,
      procedureKey: c.procedure.key,
      procedureTitle: c.procedure.title,
      stepId: c.step.id,
      stepTitle: c.step.title,
      valueId: c.valueId,
      label: c.label,
      unit: c.unit,
      kind: c.kind,
      decimals: c.decimals,
      limits,
      points,
      drift: driftOf(points.map((p) => p.value), limits),
    });
  }
  return { machineId, rule: DRIFT_RULE, series };
}
